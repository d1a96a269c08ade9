/**
 * The demo history generator (server/seed/history-generator.ts): deterministic for a seed, push
 * payloads of the wire shape, the plant consistent with IAPWS-IF97, each invented fault present in
 * the numbers, and what the round analysis (shared/cycle analyseRound, the three routes of a shift
 * together) makes of them.
 *
 * Sources: IAPWS-IF97 saturation temperatures from Debian's python3-iapws (IAPWS97(P, x=0).T);
 * σ of a reading from its accuracy spec (GUM JCGM 100:2008 §4.3.7 rectangular a/√3, as
 * shared/uncertainty implements it); absolute = gauge + barometric pressure (the pressure
 * reference convention of the design, common practice). Fault sizes are this generator's own
 * specification (DEFAULT_FAULTS); trend slopes are fitted by ordinary least squares.
 */
import { execFileSync } from 'node:child_process';
import { PushRequest } from '@/shared/api/sync';
import { analyseRound, specSigmaOf, type RoundAnalysis } from '@/shared/cycle';
import { demoUnit } from '@/demo/unit';
import { BLAME_KINDS, binomialUpper, simulateOrders } from '@/tests/helpers/detection';
import { tsat } from '@/shared/steam';
import { fernhallowRoutes } from '@/demo/routes';
import {
  analysisInput,
  DEFAULT_FAULTS,
  DESIGN_CONDENSER_TTD,
  generateHistory,
  mulberry32,
  uuidFor,
  type HistoryReading,
  type HistoryShift,
} from '@/server/seed/history-generator';

const MULBERRY32_PY = `
import json
M = 0xffffffff
def imul(a, b):
    r = (a * b) & M
    return r
a = 1
out = []
for _ in range(5):
    a = (a + 0x6D2B79F5) & M
    t = a
    t = imul(t ^ (t >> 15), t | 1)
    t = (t ^ ((t + imul(t ^ (t >> 7), t | 61)) & M)) & M
    out.append(((t ^ (t >> 14)) & M) / 4294967296)
print(json.dumps(out))
`;

const START = new Date('2025-09-01T00:00:00+01:00'); // local midnight, Europe/London (BST)
const history = generateHistory({ start: START, days: 90, seed: 1 });
const F = DEFAULT_FAULTS;
const inst = (tag: string) => demoUnit.instruments.find((i) => i.tag === tag)!;
/** the σ the analysis gives the instrument (its accuracy spec at its reference value), as the generator draws it */
const sigmaOf = (tag: string, _v: number) => specSigmaOf(demoUnit, inst(tag), 101325)!;
const reading = (s: HistoryShift, tag: string): HistoryReading => s.readings.find((r) => r.tag === tag)!;

/** Each shift's three routes analysed together, with the two shifts before for the stuck check. */
function analysedHistory(h: { shifts: HistoryShift[] }): RoundAnalysis[] {
  const prev: { readings: { instrumentTag: string; valueSI: number }[] }[] = [];
  return h.shifts.map((s) => {
    const { readings, barometricPa } = analysisInput(s);
    const a = analyseRound(demoUnit, readings, { barometricPa, previousRounds: prev.slice(-2) });
    prev.push({ readings });
    return a;
  });
}

/** Ordinary least squares slope of y on x. */
function slope(xs: number[], ys: number[]): number {
  const n = xs.length;
  const mx = xs.reduce((a, b) => a + b, 0) / n;
  const my = ys.reduce((a, b) => a + b, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (xs[i] - mx) * (ys[i] - my);
    sxx += (xs[i] - mx) ** 2;
  }
  return sxy / sxx;
}

describe('deterministic and well-formed', () => {
  test('the same seed gives the same payloads byte for byte; another seed other numbers and ids', () => {
    const again = generateHistory({ start: START, days: 90, seed: 1 });
    expect(JSON.stringify(again.shifts.map((s) => s.payload))).toBe(
      JSON.stringify(history.shifts.map((s) => s.payload)),
    );
    const other = generateHistory({ start: START, days: 5, seed: 2 });
    expect(other.shifts[0].payload.rounds[0].id).not.toBe(history.shifts[0].payload.rounds[0].id);
    expect(other.shifts[0].readings.map((r) => r.valueTyped)).not.toEqual(
      history.shifts[0].readings.map((r) => r.valueTyped),
    );
    // mulberry32 against the published algorithm (Tommy Ettinger's, as in bryc's JavaScript), written out again in Python
    const u = mulberry32(1);
    const mine = Array.from({ length: 5 }, () => u());
    const ref = JSON.parse(execFileSync('/usr/bin/python3', ['-c', MULBERRY32_PY], { encoding: 'utf8' })) as number[];
    expect(mine).toEqual(ref);
    expect(uuidFor(1, 'x')).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-8[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
  });

  test('90 days × 3 shifts, each a version-2 push of its three rounds, every id unique', () => {
    expect(history.shifts).toHaveLength(270);
    const ids = new Set<string>();
    const perRoute = new Map(fernhallowRoutes.map((r) => [r.id, r.stops.flatMap((s) => s.readings).length]));
    for (const s of history.shifts) {
      const parsed = PushRequest.safeParse(s.payload);
      expect(parsed.success).toBe(true);
      expect(s.payload.rounds.map((r) => r.status)).toEqual(['finished', 'finished', 'finished']);
      for (const r of s.rounds) {
        expect(s.readings.filter((x) => x.roundId === r.id)).toHaveLength(perRoute.get(r.routeKey)!);
        // walked inside its shift (site-local 06/14/22 h)
        expect(Date.parse(r.startedAt)).toBeGreaterThanOrEqual(s.start.getTime());
        expect(Date.parse(r.finishedAt)).toBeLessThan(s.end.getTime());
      }
      for (const x of [...s.payload.rounds, ...s.payload.readings, ...s.payload.checkAnswers]) {
        expect(ids.has(x.id)).toBe(false);
        ids.add(x.id);
      }
    }
    // the first shift starts at 06:00 Europe/London (BST, UTC+1) on the start date
    expect(history.shifts[0].start.toISOString()).toBe('2025-09-01T05:00:00.000Z');
    // the clocks go back on 26 Oct 2025: the night shift of the 25th lasts 9 h
    const night = history.shifts.find((s) => s.localDate === '2025-10-25' && s.shift === 2)!;
    expect(night.end.getTime() - night.start.getTime()).toBe(9 * 3_600_000);
  });

  test('bad options are refused naming the option and its limit', () => {
    expect(() => generateHistory({ start: new Date('x') })).toThrow(/start must be a valid Date/);
    expect(() => generateHistory({ start: START, days: 0 })).toThrow(
      /days must be a whole number from 1 to 3650, got 0/,
    );
    expect(() => generateHistory({ start: START, roundsPerDay: 2 as 3 })).toThrow(/roundsPerDay must be 3/);
  });
});

describe('the plant behind the numbers', () => {
  test('hotwell is saturated at the condenser pressure on every shift (IAPWS-IF97 by python3-iapws)', () => {
    const sample = history.shifts.filter((_, i) => i % 45 === 0);
    const ps = sample.map((s) => reading(s, 'PI-401').truthSI);
    const ref = JSON.parse(
      execFileSync(
        '/usr/bin/python3',
        [
          '-c',
          `import json; from iapws import IAPWS97; print(json.dumps([IAPWS97(P=p/1e6, x=0).T for p in ${JSON.stringify(ps)}]))`,
        ],
        {
          encoding: 'utf8',
        },
      ),
    ) as number[];
    sample.forEach((s, k) => {
      expect(reading(s, 'TI-401').truthSI).toBeCloseTo(ref[k], 6);
      expect(reading(s, 'PI-402').truthSI).toBe(reading(s, 'PI-401').truthSI);
    });
  });

  test('clean readings carry Gaussian noise at the analysis’ own σ, unclipped (temperatures and flows: no barometric part)', () => {
    const e: number[] = [];
    for (const sh of history.shifts) {
      for (const r of sh.readings) {
        if (r.fault || (r.quantity !== 'temperature' && r.quantity !== 'massFlow')) continue;
        e.push((r.valueSI - r.truthSI) / specSigmaOf(demoUnit, inst(r.tag), 101325)!);
      }
    }
    expect(e.length).toBeGreaterThan(5000);
    const mean = e.reduce((a, x) => a + x, 0) / e.length;
    const sd = Math.sqrt(e.reduce((a, x) => a + (x - mean) ** 2, 0) / (e.length - 1));
    // standard normal: mean 0 (± 4/√n), sd 1 (± a few %, the typing step adds a little), 31.7 % beyond 1σ, 0.27 % beyond 3σ
    expect(Math.abs(mean)).toBeLessThan(4 / Math.sqrt(e.length));
    expect(sd).toBeGreaterThan(0.97);
    expect(sd).toBeLessThan(1.05);
    expect(Math.abs(e.filter((x) => Math.abs(x) > 1).length / e.length - 0.317)).toBeLessThan(0.02);
    expect(e.filter((x) => Math.abs(x) > 3).length).toBeGreaterThan(0); // not clipped
  });

  test('the load swings: main steam flow spans more than ±5 % over the history', () => {
    const flows = history.shifts.map((s) => s.parameters.mainSteamFlow / 30);
    expect(Math.min(...flows)).toBeLessThan(0.95);
    expect(Math.max(...flows)).toBeGreaterThan(1.05);
  });
});

describe('the faults are in the numbers', () => {
  test(`drift: ${F.drift.tag} reads high by ${F.drift.kelvinPerDay} K/day from day ${F.drift.fromDay}, zero before`, () => {
    const rows = history.shifts.map((s) => ({ t: s.t, r: reading(s, F.drift.tag) }));
    const before = rows.filter((x) => x.t < F.drift.fromDay);
    const after = rows.filter((x) => x.t > F.drift.fromDay);
    expect(before.every((x) => x.r.fault === null)).toBe(true);
    expect(after.every((x) => x.r.fault === 'drift')).toBe(true);
    // no slope before (3 standard errors of an OLS slope of 60 points at σ ≈ 0.27 K: 0.02 K/day)
    expect(
      Math.abs(
        slope(
          before.map((x) => x.t),
          before.map((x) => x.r.valueSI - x.r.truthSI),
        ),
      ),
    ).toBeLessThan(0.02);
    expect(
      slope(
        after.map((x) => x.t),
        after.map((x) => x.r.valueSI - x.r.truthSI),
      ),
    ).toBeCloseTo(F.drift.kelvinPerDay, 2);
  });

  test(`stuck: ${F.stuck.tag} shows one value from day ${F.stuck.fromDay} while PI-401 on the same shell keeps moving`, () => {
    const later = history.shifts.filter((s) => s.day >= F.stuck.fromDay);
    const values = new Set(later.map((s) => reading(s, F.stuck.tag).valueTyped));
    expect(values.size).toBe(1);
    const earlier = history.shifts.filter((s) => s.day < F.stuck.fromDay);
    expect(new Set(earlier.map((s) => reading(s, F.stuck.tag).valueTyped)).size).toBeGreaterThan(20);
    const vac = later.map((s) => reading(s, 'PI-401').valueSI);
    expect(Math.max(...vac) - Math.min(...vac)).toBeGreaterThan(5 * sigmaOf('PI-401', vac[0]));
  });

  test(`read as absolute: ${F.readAsAbsolute.tag} typed as bar(a) on six rounds; stored one barometric pressure low`, () => {
    const hit = history.shifts.filter((s) => reading(s, F.readAsAbsolute.tag).fault === 'read-as-absolute');
    expect(hit.map((s) => `${s.day}.${s.shift}`)).toEqual(['3.0', '6.1', '9.2', '13.0', '16.1', '19.2']);
    for (const s of hit) {
      const r = reading(s, F.readAsAbsolute.tag);
      expect(r.reference).toBe('absolute');
      // the offset is the round's barometric pressure, within the gauge's σ and the weather
      expect(Math.abs(r.truthSI - r.valueSI - s.barometricPa)).toBeLessThan(4.5 * sigmaOf(r.tag, r.truthSI) + 100);
    }
    const rest = history.shifts.filter((s) => !hit.includes(s)).map((s) => reading(s, F.readAsAbsolute.tag));
    expect(
      rest.every(
        (r) => r.reference === 'gauge' && Math.abs(r.valueSI - r.truthSI) < 4.5 * sigmaOf(r.tag, r.truthSI) + 100,
      ),
    ).toBe(true);
  });

  test(`fouling: the condenser TTD rises ${F.fouling.ttdKelvinPerDay} K/day from day ${F.fouling.fromDay}, in the truth and in the healthy readings`, () => {
    const ttdRead = (s: HistoryShift) =>
      tsat(reading(s, 'PI-401').valueSI) - (reading(s, 'TI-403A').valueSI + reading(s, 'TI-403B').valueSI) / 2;
    const pre = history.shifts.filter((s) => s.t < F.fouling.fromDay);
    const post = history.shifts.filter((s) => s.t > F.fouling.fromDay);
    expect(
      slope(
        post.map((s) => s.t),
        post.map((s) => s.condenserTTD),
      ),
    ).toBeCloseTo(F.fouling.ttdKelvinPerDay, 1);
    expect(
      Math.abs(
        slope(
          pre.map((s) => s.t),
          pre.map((s) => s.condenserTTD),
        ),
      ),
    ).toBeLessThan(0.01);
    expect(
      slope(
        post.map((s) => s.t),
        post.map(ttdRead),
      ),
    ).toBeGreaterThan(0.08);
    expect(
      slope(
        post.map((s) => s.t),
        post.map(ttdRead),
      ),
    ).toBeLessThan(0.12);
    // before the fouling the TTD stays near its design value (tsat(9 kPa) − 35 °C ≈ 8.76 K)
    expect(DESIGN_CONDENSER_TTD).toBeCloseTo(8.76, 2);
    const meanPre = pre.reduce((a, s) => a + s.condenserTTD, 0) / pre.length;
    expect(Math.abs(meanPre - DESIGN_CONDENSER_TTD)).toBeLessThan(0.3);
  });
});

describe('what the round analysis finds (analyseRound on the three routes of a shift)', () => {
  let analyses: RoundAnalysis[];
  beforeAll(() => {
    analyses = analysedHistory(history);
  });
  const absShift = (s: HistoryShift) => reading(s, F.readAsAbsolute.tag).fault === 'read-as-absolute';

  test('a fault-free history (the same plant, the faults moved past its end): no work order in 90 days; rounds with a flag ≤ 5 % (+ tolerance)', () => {
    const never = {
      drift: { ...F.drift, fromDay: 1e9 },
      stuck: { ...F.stuck, fromDay: 1e9 },
      readAsAbsolute: { ...F.readAsAbsolute, fromDay: 1e9, untilDay: 1e9 },
      fouling: { ...F.fouling, fromDay: 1e9 },
    };
    const clean = analysedHistory(generateHistory({ start: START, days: 90, seed: 1, faults: never }));
    expect(simulateOrders(clean)).toEqual([]);
    const flagged = clean.filter((a) => a.findings.some((f) => BLAME_KINDS.has(f.kind))).length;
    expect(flagged / clean.length).toBeLessThanOrEqual(binomialUpper(0.05, clean.length));
  });

  test('every read-as-absolute round: "gauge-read-as-absolute" on PI-302, its difference the barometric pressure', () => {
    history.shifts.forEach((s, i) => {
      const f = analyses[i].findings.find((x) => x.kind === 'gauge-read-as-absolute');
      if (!absShift(s)) return expect(f).toBeUndefined();
      expect(f?.instrumentTags).toEqual([F.readAsAbsolute.tag]);
      expect(Math.abs((f!.evidence.difference as number) - s.barometerSI)).toBeLessThanOrEqual(
        f!.evidence.allowed as number,
      );
      expect(f!.evidence.barometricPa).toBe(s.barometerSI);
    });
  });

  test('each injected fault opens its work order, and nothing else does (when: round and σ)', () => {
    const orders = simulateOrders(analyses).map((o) => ({
      ...o,
      day: history.shifts[o.round].day,
      shift: history.shifts[o.round].shift,
    }));
    const sigma = sigmaOf(F.drift.tag, reading(history.shifts[0], F.drift.tag).truthSI);
    const drift = (i: number) => Math.max(0, F.drift.kelvinPerDay * (history.shifts[i].t - F.drift.fromDay)) / sigma;
    expect(orders.map((o) => [o.kind, o.target])).toEqual([
      ['calibrate', F.readAsAbsolute.tag],
      ['calibrate', F.drift.tag],
      ['check-group', `${F.stuck.tag}+TI-401`],
      ['repair', F.stuck.tag],
      ['clean', 'cond'],
    ]);
    const [abs, dr, group, stuck, clean] = orders;
    // read as absolute: on its first such round (day 3), a gross error (|u| ≈ 23) through the fast path
    expect([abs.day, abs.shift]).toEqual([3, 0]);
    // drift: found by the CUSUM of its own rounds at about 2 σ (day 30, 0.5 K; seed 1)
    expect(drift(dr.round)).toBeGreaterThan(1);
    expect(drift(dr.round)).toBeLessThan(3);
    // stuck: the frozen gauge disagrees with the condenser at once (PI-402 and TI-401 cannot be told apart), the stuck check on its third frozen round
    expect([group.day, stuck.day, stuck.shift]).toEqual([F.stuck.fromDay, F.stuck.fromDay, 2]);
    // fouling: the TTD check (design + 3 K, on the reconciled TTD, which carries its own noise) once the fouling has added nearly 3 K
    expect(history.shifts[clean.round].condenserTTD).toBeGreaterThan(DESIGN_CONDENSER_TTD + 2.5);
    expect(clean.day).toBeLessThan(90);
  });

  test(`the stuck ${F.stuck.tag} is called stuck from its third frozen round on, never before`, () => {
    history.shifts.forEach((s, i) => {
      const stuck = analyses[i].findings.some((f) => f.kind === 'stuck-value' && f.instrumentTags[0] === F.stuck.tag);
      expect(stuck).toBe(s.day > F.stuck.fromDay || (s.day === F.stuck.fromDay && s.shift === 2));
    });
  });

  test('the fouling shows in the reconciled condenser TTD: ~0.1 K/day from day 60, flat before', () => {
    const ttd = (a: RoundAnalysis) => a.performance.find((p) => p.kind === 'condenser-ttd')!.value!;
    const pick = (lo: number, hi: number) =>
      history.shifts.map((s, i) => ({ s, i })).filter(({ s }) => s.t > lo && s.t < hi);
    const post = pick(F.fouling.fromDay, Infinity);
    const pre = pick(0, F.stuck.fromDay);
    const postSlope = slope(
      post.map(({ s }) => s.t),
      post.map(({ i }) => ttd(analyses[i])),
    );
    expect(postSlope).toBeGreaterThan(0.07);
    expect(postSlope).toBeLessThan(0.13);
    expect(
      Math.abs(
        slope(
          pre.map(({ s }) => s.t),
          pre.map(({ i }) => ttd(analyses[i])),
        ),
      ),
    ).toBeLessThan(0.01);
  });
});
