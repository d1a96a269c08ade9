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
import { analyseRound, type RoundAnalysis } from '@/shared/cycle';
import { demoUnit } from '@/demo/unit';
import { tsat } from '@/shared/steam';
import { sigmaFor } from '@/shared/uncertainty';
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
const sigmaOf = (tag: string, v: number) => sigmaFor(inst(tag).accuracy, v);
const reading = (s: HistoryShift, tag: string): HistoryReading => s.readings.find((r) => r.tag === tag)!;

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
    expect(JSON.stringify(again.shifts.map((s) => s.payload))).toBe(JSON.stringify(history.shifts.map((s) => s.payload)));
    const other = generateHistory({ start: START, days: 5, seed: 2 });
    expect(other.shifts[0].payload.rounds[0].id).not.toBe(history.shifts[0].payload.rounds[0].id);
    expect(other.shifts[0].readings.map((r) => r.valueTyped)).not.toEqual(history.shifts[0].readings.map((r) => r.valueTyped));
    // mulberry32 against the published algorithm (Tommy Ettinger's, as in bryc's JavaScript), written out again in Python
    const u = mulberry32(1);
    const mine = Array.from({ length: 5 }, () => u());
    const ref = JSON.parse(
      execFileSync('/usr/bin/python3', ['-c', MULBERRY32_PY], { encoding: 'utf8' }),
    ) as number[];
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
    expect(() => generateHistory({ start: START, days: 0 })).toThrow(/days must be a whole number from 1 to 3650, got 0/);
    expect(() => generateHistory({ start: START, roundsPerDay: 2 as 3 })).toThrow(/roundsPerDay must be 3/);
  });
});

describe('the plant behind the numbers', () => {
  test('hotwell is saturated at the condenser pressure on every shift (IAPWS-IF97 by python3-iapws)', () => {
    const sample = history.shifts.filter((_, i) => i % 45 === 0);
    const ps = sample.map((s) => reading(s, 'PI-401').truthSI);
    const ref = JSON.parse(
      execFileSync('/usr/bin/python3', ['-c', `import json; from iapws import IAPWS97; print(json.dumps([IAPWS97(P=p/1e6, x=0).T for p in ${JSON.stringify(ps)}]))`], {
        encoding: 'utf8',
      }),
    ) as number[];
    sample.forEach((s, k) => {
      expect(reading(s, 'TI-401').truthSI).toBeCloseTo(ref[k], 6);
      expect(reading(s, 'PI-402').truthSI).toBe(reading(s, 'PI-401').truthSI);
    });
  });

  test('clean readings lie within 1 σ of the truth (+ the typing step and, off the barometer route, the weather)', () => {
    let checked = 0;
    for (const s of history.shifts) {
      for (const r of s.readings) {
        if (r.fault || r.tag === 'PI-001') continue;
        const i = inst(r.tag);
        // gauge and vacuum readings: off the barometer's route the server converts with the standard
        // atmosphere (the weather swing, ≤ 250 Pa + scatter); on it, with the barometer reading (its own σ ≈ 60 Pa)
        const baro = r.quantity === 'pressure' && r.reference !== 'absolute' ? (r.routeKey === 'boiler-house' ? 100 : 400) : 0;
        // typed to a tenth of the division (± a twentieth), nudged by one step against an exact triple repeat
        const res = (i.accuracy as { resolution?: number }).resolution;
        const typing = res ? 0.2 * res : 2e-3 * Math.abs(r.truthSI);
        expect(Math.abs(r.valueSI - r.truthSI)).toBeLessThanOrEqual(sigmaOf(r.tag, r.truthSI) + typing + baro);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(10_000);
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
    expect(Math.abs(slope(before.map((x) => x.t), before.map((x) => x.r.valueSI - x.r.truthSI)))).toBeLessThan(0.003);
    expect(slope(after.map((x) => x.t), after.map((x) => x.r.valueSI - x.r.truthSI))).toBeCloseTo(F.drift.kelvinPerDay, 2);
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
      expect(Math.abs(r.truthSI - r.valueSI - s.barometricPa)).toBeLessThan(sigmaOf(r.tag, r.truthSI) + 100);
    }
    const rest = history.shifts.filter((s) => !hit.includes(s)).map((s) => reading(s, F.readAsAbsolute.tag));
    expect(rest.every((r) => r.reference === 'gauge' && Math.abs(r.valueSI - r.truthSI) < sigmaOf(r.tag, r.truthSI) + 100)).toBe(true);
  });

  test(`fouling: the condenser TTD rises ${F.fouling.ttdKelvinPerDay} K/day from day ${F.fouling.fromDay}, in the truth and in the healthy readings`, () => {
    const ttdRead = (s: HistoryShift) => tsat(reading(s, 'PI-401').valueSI) - (reading(s, 'TI-403A').valueSI + reading(s, 'TI-403B').valueSI) / 2;
    const pre = history.shifts.filter((s) => s.t < F.fouling.fromDay);
    const post = history.shifts.filter((s) => s.t > F.fouling.fromDay);
    expect(slope(post.map((s) => s.t), post.map((s) => s.condenserTTD))).toBeCloseTo(F.fouling.ttdKelvinPerDay, 1);
    expect(Math.abs(slope(pre.map((s) => s.t), pre.map((s) => s.condenserTTD)))).toBeLessThan(0.01);
    expect(slope(post.map((s) => s.t), post.map(ttdRead))).toBeGreaterThan(0.08);
    expect(slope(post.map((s) => s.t), post.map(ttdRead))).toBeLessThan(0.12);
    // before the fouling the TTD stays near its design value (tsat(9 kPa) − 35 °C ≈ 8.76 K)
    expect(DESIGN_CONDENSER_TTD).toBeCloseTo(8.76, 2);
    const meanPre = pre.reduce((a, s) => a + s.condenserTTD, 0) / pre.length;
    expect(Math.abs(meanPre - DESIGN_CONDENSER_TTD)).toBeLessThan(0.3);
  });
});

describe('what the round analysis finds (analyseRound on the three routes of a shift)', () => {
  let analyses: RoundAnalysis[];
  beforeAll(() => {
    analyses = [];
    const prev: { readings: { instrumentTag: string; valueSI: number }[] }[] = [];
    for (const s of history.shifts) {
      const { readings, barometricPa } = analysisInput(s);
      analyses.push(analyseRound(demoUnit, readings, { barometricPa, previousRounds: prev.slice(-2) }));
      prev.push({ readings });
    }
  });
  const names = (a: RoundAnalysis, tag: string, kinds?: string[]) => a.findings.some((f) => f.instrumentTags.includes(tag) && (!kinds || kinds.includes(f.kind)));
  const absShift = (s: HistoryShift) => reading(s, F.readAsAbsolute.tag).fault === 'read-as-absolute';

  test('healthy shifts have no finding at all (days 0–29 without the read-as-absolute rounds)', () => {
    history.shifts.forEach((s, i) => {
      if (s.day < 30 && !absShift(s)) expect(analyses[i].findings.map((f) => f.kind)).toEqual([]);
    });
  });

  test('every read-as-absolute round: "gauge-read-as-absolute" on PI-302, its difference the barometric pressure', () => {
    history.shifts.forEach((s, i) => {
      const f = analyses[i].findings.find((x) => x.kind === 'gauge-read-as-absolute');
      if (!absShift(s)) return expect(f).toBeUndefined();
      expect(f?.instrumentTags).toEqual([F.readAsAbsolute.tag]);
      expect(Math.abs((f!.evidence.difference as number) - s.barometerSI)).toBeLessThanOrEqual(f!.evidence.allowed as number);
      expect(f!.evidence.barometricPa).toBe(s.barometerSI);
    });
  });

  test(`the drifting ${F.drift.tag} is named once its drift passes ~2.5 σ, on every shift past 4 σ, as a gross error past 8 σ`, () => {
    const sigma = sigmaOf(F.drift.tag, reading(history.shifts[0], F.drift.tag).truthSI);
    const drift = (s: HistoryShift) => Math.max(0, F.drift.kelvinPerDay * (s.t - F.drift.fromDay)) / sigma;
    const firstIndex = analyses.findIndex((a) => names(a, F.drift.tag));
    const first = drift(history.shifts[firstIndex]);
    // stated in the report: first named at about 2.6 σ (≈ 0.7 K, day 33), a saturation mismatch at the deaerator
    expect(first).toBeGreaterThan(2);
    expect(first).toBeLessThan(3);
    expect(analyses[firstIndex].findings.find((f) => f.instrumentTags.includes(F.drift.tag))!.kind).toBe('saturation-mismatch');
    history.shifts.forEach((s, i) => {
      if (drift(s) > 4) expect(names(analyses[i], F.drift.tag)).toBe(true);
      if (drift(s) > 8) expect(names(analyses[i], F.drift.tag, ['gross-error'])).toBe(true);
    });
  });

  test(`the stuck ${F.stuck.tag} is called stuck from its third frozen round on, never before`, () => {
    history.shifts.forEach((s, i) => {
      const stuck = analyses[i].findings.some((f) => f.kind === 'stuck-value' && f.instrumentTags[0] === F.stuck.tag);
      expect(stuck).toBe(s.day > F.stuck.fromDay || (s.day === F.stuck.fromDay && s.shift === 2));
    });
  });

  test('the fouling shows in the reconciled condenser TTD: ~0.1 K/day from day 60, flat before', () => {
    const ttd = (a: RoundAnalysis) => a.performance.find((p) => p.kind === 'condenser-ttd')!.value!;
    const pick = (lo: number, hi: number) => history.shifts.map((s, i) => ({ s, i })).filter(({ s }) => s.t > lo && s.t < hi);
    const post = pick(F.fouling.fromDay, Infinity);
    const pre = pick(0, F.stuck.fromDay);
    const postSlope = slope(post.map(({ s }) => s.t), post.map(({ i }) => ttd(analyses[i])));
    expect(postSlope).toBeGreaterThan(0.07);
    expect(postSlope).toBeLessThan(0.13);
    expect(Math.abs(slope(pre.map(({ s }) => s.t), pre.map(({ i }) => ttd(analyses[i]))))).toBeLessThan(0.01);
  });
});
