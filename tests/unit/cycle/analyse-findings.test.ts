/**
 * Round analysis on the demo unit: gross errors named by the reconciliation (VDI 2048 serial
 * elimination), a gauge read as absolute, the plain checks, robustness and determinism.
 *
 * Sources: detectability of a single gross error by the measurement test — for a bias b on
 * measurement j the expected normalised correction of i is |W_ij|/√W_ii·b/σ_j, largest for i = j
 * unless two columns of W are parallel (Narasimhan & Jordache 1999, ch. 7, from memory; it follows
 * from Cauchy–Schwarz on the positive semi-definite W). W_jj = 1 − (σ̂_j/σ_j)² is read from the
 * reconciled σ. The plant facts used below (what measures what) come from the demo unit itself.
 */
import { analyseRound, CycleError, type RoundAnalysis, type RoundReading } from '@/shared/cycle';
import { demoDesignPoint, demoDesignReadings, demoUnit } from '@/demo/unit';
import { lcg, nonFinite, plain, withValue } from './helpers';

const B = 101325;
const design = plain(demoDesignReadings(B));
const run = (readings: RoundReading[], extra: Partial<Parameters<typeof analyseRound>[2]> = {}) =>
  analyseRound(demoUnit, readings, { barometricPa: B, ...extra });
const base = run(design);
const instr = (tag: string) => base.instruments.find((i) => i.tag === tag)!;
const kinds = (a: RoundAnalysis) => a.findings.map((f) => f.kind);
const first = (a: RoundAnalysis, kind: string) => a.findings.find((f) => f.kind === kind);

/**
 * Instruments the balances cannot tell apart: their corrections correlate by |ρ| ≥ 0.95
 * (shared/reconcile GROUP_CORRELATION), so each group's readings reach the balances through
 * (nearly) one combination only.
 */
const ALIKE: string[][] = [
  ['PI-101', 'TI-101'], // drum p and T meet only in the drum's saturation
  ['PI-201', 'TI-201'], // HP exhaust p and T enter only as its enthalpy h(p, T)
  ['PI-202', 'TI-202'], // process steam p and T likewise
  ['TI-102A', 'TI-102B'], // main-steam twins: little but each other holds them
  ['PI-402', 'TI-401'], // condenser absolute pressure and hotwell temperature: saturation, and PI-401 only through them
  ['JI-601', 'JI-602'], // the two power meters of the generator
  // main steam p, condensate and cooling-water inlet temperatures, cooling-water flow: all end up in
  // the one row left once the LP exhaust quality is eliminated (generator output against condenser duty)
  ['PI-102', 'TI-205', 'TI-402', 'FI-401'],
  // the LP heater's condensate outlet, extraction flow, deaerator inlet and LP extraction pressure
  ['FI-202', 'TI-206', 'TI-302', 'PI-501'],
];
/** redundant, but an 8σ error moves its own correction by less than 0.3·8σ (W_jj < 0.1) */
const WEAK = ['PI-102', 'PI-201', 'PI-202', 'TI-205', 'PI-501'];

describe('gross errors: a biased instrument is named first (serial elimination, VDI 2048)', () => {
  const redundant = base.instruments.filter((i) => i.redundant);
  const W = (tag: string) => {
    const i = instr(tag);
    return 1 - (i.reconciledSigma! / i.sigma!) ** 2;
  };

  test('redundancy of the demo unit: enough redundant instruments, the weak ones are the expected ones', () => {
    expect(redundant.length).toBeGreaterThanOrEqual(25);
    expect(
      redundant
        .filter((i) => W(i.tag) < 0.1)
        .map((i) => i.tag)
        .sort(),
    ).toEqual([...WEAK].sort());
    // not in any balance: the boiler feed pump discharge (no pump power is read) and the levels
    const free = base.instruments.filter((i) => i.status === 'not-in-balance').map((i) => i.tag);
    expect(free).toEqual(expect.arrayContaining(['PI-103', 'TI-103', 'LI-101', 'LI-201', 'LI-301', 'LI-401']));
  });

  const cases = redundant
    .filter((i) => W(i.tag) >= 0.1)
    .flatMap((i) => [
      { tag: i.tag, sign: 1 },
      { tag: i.tag, sign: -1 },
    ]);
  test.each(cases)('$tag biased by $sign × max(8σ, 8σ/√W)', ({ tag, sign }) => {
    const i = instr(tag);
    const beta = Math.max(8, 8 / Math.sqrt(W(tag)));
    const truth = design.find((r) => r.instrumentTag === tag)!.valueSI;
    const a = run(withValue(design, tag, (v) => v + sign * beta * i.sigma!));
    expect(a.reconciliation.ok).toBe(true);
    if (!a.reconciliation.ok) return;
    expect(a.reconciliation.passed).toBe(false);
    const group = ALIKE.find((g) => g.includes(tag));
    const ge = a.findings.filter((f) => f.kind === 'gross-error');
    expect(ge.length).toBe(1);
    if (!group) {
      expect(a.reconciliation.suspects[0]).toBe(tag);
      expect(ge[0].instrumentTags).toEqual([tag]);
      // its estimated true value (the reconciliation without it) is the design value
      expect(ge[0].evidence.estimate as number).toBeCloseTo(truth, 4);
      // direction as the face shows it: a vacuum gauge reads less vacuum when the absolute pressure is high
      const up = sign > 0 !== (tag === 'PI-401');
      expect(ge[0].message).toContain(up ? ' above what ' : ' below what ');
    } else {
      // the finding names the whole group, the first suspect is one of it
      expect(group).toContain(a.reconciliation.suspects[0]);
      expect(ge[0].instrumentTags).toContain(tag);
      for (const t of ge[0].instrumentTags) expect(group).toContain(t);
      expect(ge[0].message).toMatch(/ or .*\(the balances cannot tell which\)/);
    }
    // severity 1 urgent … 3 note (shared/cycle/severity.ts): a gross error is urgent or to attend to
    expect(ge[0].severity).toBeLessThanOrEqual(2);
    expect(nonFinite(a)).toEqual([]);
  });

  test.each(redundant.filter((i) => W(i.tag) >= 0.5 && !ALIKE.some((g) => g.includes(i.tag))).map((i) => i.tag))(
    '%s biased by exactly +8σ is the first suspect (W ≥ 0.5: expected test value ≥ 5.7)',
    (tag) => {
      const a = run(withValue(design, tag, (v) => v + 8 * instr(tag).sigma!));
      expect(a.reconciliation.ok && a.reconciliation.suspects[0]).toBe(tag);
    },
  );

  test('the message reads in trade language, in the instrument’s own unit: "TI-206 or … (the balances cannot tell which) reads … K above what the … balances allow (… °C ± … K)"', () => {
    const a = run(withValue(design, 'TI-206', (v) => v + 6));
    const f = first(a, 'gross-error')!;
    expect(f.message).toMatch(
      /^TI-206 or FI-202 or TI-302 or PI-501 \(the balances cannot tell which\) reads 6\.0 K above what the LP feedwater heater and deaerator balances allow \(130\.5 °C ± \d\.\d K\)\.$/,
    );
    expect(f.instrumentTags).toEqual(['TI-206', 'FI-202', 'TI-302', 'PI-501']);
    expect(f.pointId).toBe('lhf');
    expect(f.evidence.z as number).toBeGreaterThan(f.evidence.zCritical as number);
  });
});

describe('a gauge read as absolute (or the reverse) says so', () => {
  test('deaerator gauge PI-301 entered as bar(a): finding names the barometric pressure', () => {
    const b = 98000;
    const r = withValue(plain(demoDesignReadings(b)), 'PI-301', (v) => v - b);
    const a = analyseRound(demoUnit, r, { barometricPa: b });
    const f = first(a, 'gauge-read-as-absolute');
    expect(f).toBeDefined();
    expect(f!.instrumentTags).toEqual(['PI-301']);
    expect(f!.message).toMatch(
      /PI-301 looks read as absolute: it reads 98\.0 kPa below .*\(3\.520 bar\(g\)\), which is the barometric pressure of this round \(98\.0 kPa\)\. A bar\(g\) value was probably entered as bar\(a\)\./,
    );
    expect(a.reconciliation.ok && a.reconciliation.suspects[0]).toBe('PI-301');
  });
  test('an error of another size is not called a gauge read as absolute', () => {
    const r = withValue(design, 'PI-301', (v) => v - 40000);
    const a = run(r);
    expect(kinds(a)).toContain('gross-error');
    expect(kinds(a)).not.toContain('gauge-read-as-absolute');
  });
  test('absolute condenser gauge PI-402 entered as gauge (barometric added)', () => {
    const a = run(withValue(design, 'PI-402', (v) => v + B));
    const f = first(a, 'absolute-read-as-gauge');
    expect(f?.instrumentTags).toEqual(['PI-402']);
    expect(f!.message).toMatch(/looks read as gauge/);
  });
  test('condenser vacuum PI-401 entered as an absolute pressure', () => {
    const a = run(withValue(design, 'PI-401', (v) => B - v));
    const f = first(a, 'gauge-read-as-absolute');
    expect(f?.instrumentTags).toEqual(['PI-401']);
    expect(f!.message).toMatch(/vacuum reading entered as absolute/);
  });
});

describe('plain checks', () => {
  test('twins are tested once, by the reconciliation (their agreement is a constraint): the wrong twin is named against its twin', () => {
    const a = run(withValue(design, 'TI-403A', (v) => v + 1.0));
    expect(kinds(a)).not.toContain('twin-disagreement');
    const f = first(a, 'gross-error')!;
    expect(f.instrumentTags).toEqual(['TI-403A']);
    expect(f.message).toMatch(
      /^TI-403A reads 1\.00 K above what its twin TI-403B and the condenser balance allow \(35\.00 °C ± 0\.25 K\)\.$/,
    );
    // a difference the reconciliation's tests accept is no finding at all
    const sa = a.instruments.find((i) => i.tag === 'TI-403A')!.sigma!;
    expect(run(withValue(design, 'TI-403A', (v) => v + 1.5 * sa)).findings).toEqual([]);
  });
  test('a saturated point whose p and T disagree is tested once, by the reconciliation (deaerator: TI-301 3 K above tsat)', () => {
    const a = run(withValue(design, 'TI-301', (v) => v + 3));
    expect(kinds(a)).not.toContain('saturation-mismatch');
    const f = first(a, 'gross-error')!;
    expect(f.instrumentTags).toEqual(['TI-301']);
    // what the rest of the plant says it should read: the saturation temperature at the deaerator (IF97 design point)
    expect(f.evidence.estimate as number).toBeCloseTo(demoDesignPoint().points.dao.T, 2);
    expect(f.message).toMatch(
      /^TI-301 reads 3\.00 K above what saturation at deaerator outlet \/ feed pump suction allows \(147\.91 °C ± 0\.44 K\)\.$/,
    );
  });
  test('a superheated point whose thermometer reads below saturation', () => {
    const a = run(withValue(design, 'TI-204', (v) => v - 30));
    const f = first(a, 'phase-mismatch')!;
    expect(f.instrumentTags).toEqual(['TI-204', 'PI-203']);
    expect(f.message).toMatch(/expected superheated steam/);
    expect(nonFinite(a)).toEqual([]);
  });
  test('a reading outside its range (drum gauge over 100 bar(g))', () => {
    const a = run(withValue(design, 'PI-101', (v) => v + 40e5));
    const f = first(a, 'out-of-range')!;
    expect(f.message).toMatch(/^PI-101 reads 106\.99 bar\(g\), above its range 0–100 bar\(g\)/);
  });
  test('readings outside IF97 are set aside with a finding, not a crash', () => {
    let r = withValue(design, 'TI-207', () => 200);
    r = withValue(r, 'PI-102', () => 150e6);
    const a = run(r);
    const out = a.findings.filter((f) => f.kind === 'outside-if97');
    expect(out.map((f) => f.instrumentTags[0]).sort()).toEqual(['PI-102', 'TI-207']);
    expect(a.instruments.find((i) => i.tag === 'TI-207')!.status).toBe('excluded');
    expect(a.reconciliation.ok).toBe(true);
    expect(nonFinite(a)).toEqual([]);
  });
  test('a value stuck over 3 rounds while its neighbours moved', () => {
    const prev = [1, 2].map((k) => ({
      readings: design.map((r) => (r.instrumentTag === 'TI-206' ? r : { ...r, valueSI: r.valueSI * (1 + 0.003 * k) })),
    }));
    const a = run(design, { previousRounds: prev });
    const f = first(a, 'stuck-value')!;
    expect(f.instrumentTags).toEqual(['TI-206']);
    expect(f.message).toMatch(/on the last 3 rounds while its neighbours moved \(TI-204 by/);
    // everything stuck: nothing moved, nothing to hold it against
    expect(kinds(run(design, { previousRounds: [{ readings: design }, { readings: design }] }))).not.toContain(
      'stuck-value',
    );
    // only one previous round: too short to call
    expect(kinds(run(design, { previousRounds: prev.slice(1) }))).not.toContain('stuck-value');
    // four rounds asked, three given: not called
    expect(kinds(run(design, { previousRounds: prev, options: { stuckRounds: 4 } }))).not.toContain('stuck-value');
  });
  test('missing readings are findings; the rest is still reconciled', () => {
    const a = run(design.filter((r) => r.instrumentTag !== 'TI-206' && r.instrumentTag !== 'FI-501'));
    expect(a.findings.filter((f) => f.kind === 'missing-reading').map((f) => f.instrumentTags[0])).toEqual([
      'FI-501',
      'TI-206',
    ]);
    expect(a.reconciliation.ok && a.reconciliation.dof).toBe(base.reconciliation.ok ? base.reconciliation.dof - 2 : -1);
    // the heater outlet temperature is then found from the balances
    expect(a.statePoints.find((p) => p.id === 'lhf')!.reconciled.T).toBeCloseTo(demoDesignPoint().points.lhf.T, 4);
  });
  test('a balance that does not close because one reading is wrong says so, as a note beside that reading’s finding (make-up flow 10 % high)', () => {
    const a = run(withValue(design, 'FI-301', (v) => v * 1.1));
    expect(first(a, 'gross-error')!.instrumentTags).toEqual(['FI-301']);
    const f = a.findings.filter((x) => x.kind === 'balance-not-closed');
    expect(f.map((x) => x.equipmentId)).toContain('da');
    const da = f.find((x) => x.equipmentId === 'da')!;
    expect(da.message).toMatch(
      /^The Deaerator (mass|energy) balance does not close: .* in against .* out \(\d+\.\d % apart\), .*; FI-301 would explain it\.$/,
    );
    expect(da.severity).toBe(3);
    expect(da.evidence.explainedBy).toEqual(['FI-301']);
  });
  test('unknown instruments, readings that are not numbers, duplicates, bad σ: findings, not crashes', () => {
    const v = (tag: string) => design.find((x) => x.instrumentTag === tag)!.valueSI;
    const r: RoundReading[] = [
      { instrumentTag: 'TI-201', valueSI: v('TI-201') + 50 }, // superseded by the later reading
      ...design.filter((x) => x.instrumentTag !== 'TI-205' && x.instrumentTag !== 'TI-202'),
      { instrumentTag: 'XX-999', valueSI: 1 },
      { instrumentTag: 'TI-205', valueSI: Number.NaN },
      { instrumentTag: 'TI-202', valueSI: v('TI-202'), sigma: -1 },
    ];
    const a = run(r);
    expect(kinds(a)).toEqual(expect.arrayContaining(['unknown-instrument', 'invalid-reading', 'duplicate-reading']));
    expect(
      a.findings
        .filter((f) => f.kind === 'invalid-reading')
        .map((f) => f.instrumentTags[0])
        .sort(),
    ).toEqual(['TI-202', 'TI-205']);
    expect(a.findings.filter((f) => f.kind === 'missing-reading')).toEqual([]);
    // the last reading of TI-201 (the good one) was used; TI-202 got its σ from the accuracy spec
    expect(a.instruments.find((i) => i.tag === 'TI-201')!.reading).toBe(v('TI-201'));
    expect(a.instruments.find((i) => i.tag === 'TI-202')!.sigma).toBe(instr('TI-202').sigma);
    expect(kinds(a)).not.toContain('gross-error');
  });
  test('readings by instrument id instead of tag', () => {
    const m = structuredClone(demoUnit) as Record<string, any>;
    delete m.version;
    m.instruments.forEach(
      (i: Record<string, unknown>, k: number) => (i.id = `00000000-0000-4000-8000-${String(k).padStart(12, '0')}`),
    );
    const ids = new Map<string, string>(m.instruments.map((i: { tag: string; id: string }) => [i.tag, i.id]));
    const r = withValue(design, 'TI-301', (v) => v + 6).map((x) => ({
      instrumentId: ids.get(x.instrumentTag!),
      valueSI: x.valueSI,
    }));
    const a = analyseRound(m, r, { barometricPa: B });
    const f = first(a, 'gross-error')!;
    expect(f.instrumentTags).toEqual(['TI-301']);
    expect(f.instrumentIds).toEqual([ids.get('TI-301')]);
  });
  test('too few readings to check anything: a finding, and no reconciled state', () => {
    const a = run(design.filter((r) => r.instrumentTag === 'TI-206'));
    expect(a.reconciliation.ok).toBe(false);
    expect(kinds(a)).toContain('reconciliation-failed');
    expect(nonFinite(a)).toEqual([]);
  });
});

describe('bad model or context: a clear error', () => {
  test('invalid model', () => {
    const m = structuredClone(demoUnit) as Record<string, any>;
    m.instruments[0].range = { min: 5, max: 1 };
    expect(() => analyseRound(m, design, { barometricPa: B })).toThrow(CycleError);
    expect(() => analyseRound(m, design, { barometricPa: B })).toThrow(
      /instruments\[PI-101\]\.range: PI-101: range min 5 must be below max 1/,
    );
  });
  test.each([
    [{ barometricPa: 1013 }, /barometricPa is 1013; it must be a barometric pressure in Pa from 20000 to 120000/],
    [{ barometricPa: Number.NaN }, /barometricPa is NaN/],
    [{ barometricPa: B, options: { confidence: 1.5 } }, /options\.confidence is 1\.5; it must be in \(0, 1\)/],
    [{ barometricPa: B, options: { stuckRounds: 2 } }, /options\.stuckRounds is 2; it must be a whole number ≥ 3/],
    [{ barometricPa: B, options: { coverage: 0 } }, /options\.coverage is 0/],
    [{ barometricPa: B, options: { barometricSigmaPa: -1 } }, /options\.barometricSigmaPa is -1/],
    [{ barometricPa: B, options: { tolerance: 0 } }, /options\.tolerance is 0/],
  ])('%j', (ctx, msg) => {
    expect(() => analyseRound(demoUnit, design, ctx as never)).toThrow(msg);
  });
});

describe('never NaN, deterministic', () => {
  test('noisy rounds with gross errors of any size: no crash, no NaN (seeded, 25 rounds)', () => {
    const rnd = lcg(20240601);
    const gauss = () => Math.sqrt(-2 * Math.log(rnd() || 1e-12)) * Math.cos(2 * Math.PI * rnd());
    for (let k = 0; k < 25; k++) {
      const bad = base.instruments[Math.floor(rnd() * base.instruments.length)].tag;
      const size = (rnd() - 0.5) * 100;
      const r = design.map((x) => {
        const s = instr(x.instrumentTag!).sigma ?? 0;
        return { ...x, valueSI: x.valueSI + s * gauss() + (x.instrumentTag === bad ? size * s : 0) };
      });
      const a = run(r);
      expect(nonFinite(a)).toEqual([]);
    }
  });
  test('rounds with a third of the readings missing (seeded, 15 rounds): no crash, no NaN, undetermined values are null', () => {
    const rnd = lcg(7);
    let nulls = 0;
    for (let k = 0; k < 15; k++) {
      const a = run(design.filter(() => rnd() > 0.33));
      expect(nonFinite(a)).toEqual([]);
      nulls += a.statePoints.filter((p) => p.reconciled.h === null).length;
    }
    expect(nulls).toBeGreaterThan(0);
  });
  test('same inputs → identical output; reading order does not matter', () => {
    const r = withValue(design, 'TI-102A', (v) => v + 16);
    const a = run(r);
    const b = run(r);
    expect(b).toStrictEqual(a);
    const shuffled = [...r].reverse();
    expect(JSON.stringify(run(shuffled))).toBe(JSON.stringify(a));
    expect(a.modelVersion).toBe(demoUnit.version);
  });
  test('the barometric pressure only moves what depends on it (readings are absolute SI already)', () => {
    const a = run(design);
    const b = analyseRound(demoUnit, design, { barometricPa: 96000 });
    expect(b.reconciliation).toStrictEqual(a.reconciliation);
    expect(b.barometricPa).toBe(96000);
  });
});
