/**
 * Instrument health and history from stored analyses, on a real PostgreSQL.
 *
 * Five rounds of the Fernhallow demo unit at its design point (shared/cycle demoDesignReadings,
 * IAPWS-IF97, balances closing; noise of ±0.2σ), TI-102A 10σ high on three of them. Expected
 * figures are the test's own arithmetic on what it put in: a bias of 10σ on 3 rounds of 5 is a
 * mean (measured − reconciled) of 6σ; a calibration due date is the calibration date plus the
 * interval (the seed's intervals: thermometers 730 days — common practice for site RTDs and
 * thermocouples).
 */
import type { InstrumentHistoryResponse, InstrumentListResponse } from '../../shared/api/analysis';
import { runAnalysisJob } from '../../server/analysis/job';
import { demoUnit } from '../../demo/unit';
import { biasInWords, healthMark } from '../../lib/instrument-figures';
import { memoryLogger } from './helpers/app';
import { api, makeWorld, pushRound, type World } from './analysis-helpers';

let w: World;
const base = () => `/api/sites/${w.fernId}`;
const DAY = 86_400_000;
const day = (n: number) => new Date(Date.now() - n * DAY).toISOString();

beforeAll(async () => {
  w = await makeWorld();
  const deps = { dataSource: w.db.dataSource, logger: memoryLogger('silent').logger };
  // oldest first: day 40 with TI-102A 10σ high (pushed and analysed now, read outside the 30-day
  // window), days 5 and 4 at design, days 3, 2, 1 with TI-102A 10σ high
  for (const [n, biased] of [
    [40, true],
    [5, false],
    [4, false],
    [3, true],
    [2, true],
    [1, true],
  ] as const) {
    const r = await pushRound(w, { deviceTime: day(n), ...(biased ? { bias: { 'TI-102A': 10 } } : {}) });
    expect((await runAnalysisJob(deps, r.roundId)).status).toBe('stored');
  }
});
afterAll(() => w?.db.drop());

const health = async (q = '') => {
  const res = await api(w, 'engineer').get(`${base()}/instruments${q}`);
  expect(res.status).toBe(200);
  return res.body as InstrumentListResponse;
};

test('health: flags, mean |z|, signed bias in SI, calibration due, status and open work orders', async () => {
  const all = await health();
  const by = new Map(all.instruments.map((i) => [i.tag, i]));
  // the unit's instruments: the model's and the site barometer
  expect(all.instruments.length).toBe(demoUnit.instruments.length + 1);

  const a = by.get('TI-102A')!;
  // 3 readings of the window named (each by a gross error; the twins are tested once, by the reconciliation); the day-40
  // reading, analysed just now, is outside the window
  expect(a.flags30d).toBe(3);
  expect(a.samples30d).toBe(5);
  expect(a.siUnit).toBe('K');
  expect(a.biasSi30d! / w.sigma['TI-102A']).toBeGreaterThan(5.5);
  expect(a.biasSi30d! / w.sigma['TI-102A']).toBeLessThan(6.5);
  expect(a.meanAbsZ30d!).toBeGreaterThan(2);
  expect(a.status).toBe('suspect');
  // the main-steam twins' corrections correlate by |ρ| ≥ 0.95 (shared/reconcile GROUP_CORRELATION):
  // the balances cannot tell which of the two reads wrong, so one order checks both
  expect(a.openWorkOrders).toMatchObject([{ number: 'WO-0001', kind: 'check-group', status: 'open' }]);

  const b = by.get('TI-102B')!;
  // the gross error names both; the reconciliation's suspect is TI-102A, so the flag is TI-102A's,
  // while the check-group order marks TI-102B suspect too
  expect(b.flags30d).toBe(0);
  expect(Math.abs(b.biasSi30d!) / w.sigma['TI-102B']).toBeLessThan(1);
  expect(b.status).toBe('suspect');

  const p = by.get('PI-101')!;
  expect(p.flags30d).toBe(0);
  expect(p.siUnit).toBe('Pa');
  expect(p.meanAbsZ30d!).toBeLessThan(2);

  // due = calibration date + interval
  expect(a.calibrationIntervalDays).toBe(730);
  const due = new Date(Date.parse(`${a.lastCalibration}T00:00:00Z`) + 730 * DAY).toISOString().slice(0, 10);
  expect(a.calibrationDue).toBe(due);
  expect(a.calibrationOverdue).toBe(false);

  // the barometer is in no balance
  expect(by.get('PI-001')).toMatchObject({ samples30d: 0, meanAbsZ30d: null, biasSi30d: null, flags30d: 0 });
});

test('health filters: status, tag text, unit', async () => {
  expect((await health('?status=suspect')).instruments.map((i) => i.tag)).toEqual(['TI-102A', 'TI-102B']);
  // ordered by evidence (TI-102A in alarm), then tag
  expect((await health('?q=102')).instruments.map((i) => i.tag)).toEqual(['TI-102A', 'FI-102', 'PI-102', 'TI-102B']);
  const [{ id: unitId }] = (await w.db.dataSource.query(`SELECT id FROM units WHERE site_id = $1`, [w.fernId])) as {
    id: string;
  }[];
  expect((await health(`?unitId=${unitId}`)).instruments.length).toBe(demoUnit.instruments.length + 1);
  expect((await api(w, 'engineer').get(`${base()}/instruments?status=broken`)).status).toBe(400);
  expect((await api(w, 'tech').get(`${base()}/instruments`)).status).toBe(403);
  expect((await api(w, 'planner').get(`${base()}/instruments`)).status).toBe(200);
});

test('history: readings against reconciled values and σ, in device time, within from/to', async () => {
  const res = await api(w, 'engineer').get(`${base()}/instruments/ti-102a/history`);
  expect(res.status).toBe(200);
  const h = res.body as InstrumentHistoryResponse;
  expect(h.instrument).toMatchObject({ tag: 'TI-102A', quantity: 'temperature', siUnit: 'K', status: 'suspect' });
  expect(h.truncated).toBe(false);
  // the default 90 days hold the day-40 reading too
  expect(h.points).toHaveLength(6);
  const times = h.points.map((p) => Date.parse(p.measuredAt));
  expect([...times].sort((x, y) => x - y)).toEqual(times);
  const [d40, d5, d4, d3] = h.points;
  expect(d40.suspect).toBe(true);
  expect(d5.findings).toEqual([]);
  expect(d5.suspect).toBe(false);
  expect(d3.suspect).toBe(true);
  expect([...d3.findings].sort()).toEqual(['gross-error']);
  expect((d3.reading! - d3.estimate!) / d3.sigma!).toBeGreaterThan(8);
  expect(Math.abs(d4.reading! - d4.reconciled!) / d4.sigma!).toBeLessThan(1);
  // σ of TI-102A, worked out here: IEC 60584-1 type K class 1 tolerance max(1.5 K, 0.004·|t|) as a
  // rectangular distribution (GUM 4.3.7: /√3), with its 1 K scale resolution (GUM F.2.2.1: /√12),
  // at the main steam's design temperature (σ from a reference value, never from the reading)
  const nominalT = demoUnit.points.find((x) => x.id === 'ms')!.nominal!.T!;
  for (const p of h.points) {
    const tC = nominalT - 273.15;
    const expected = Math.hypot(Math.max(1.5, 0.004 * Math.abs(tC)) / Math.sqrt(3), 1 / Math.sqrt(12));
    expect(p.sigma!).toBeCloseTo(expected, 6);
  }

  const since = new Date(Date.now() - 2.5 * DAY).toISOString();
  const recent = (
    await api(w, 'engineer').get(`${base()}/instruments/TI-102A/history?from=${encodeURIComponent(since)}`)
  ).body as InstrumentHistoryResponse;
  expect(recent.points).toHaveLength(2);
  const until = new Date(Date.now() - 4.5 * DAY).toISOString().slice(0, 10);
  const early = (await api(w, 'engineer').get(`${base()}/instruments/TI-102A/history?to=${until}`))
    .body as InstrumentHistoryResponse;
  // `to` as a date runs to the end of that day
  expect(early.points.length).toBeGreaterThanOrEqual(1);
  expect(early.points.every((p) => p.measuredAt.slice(0, 10) <= until)).toBe(true);

  expect((await api(w, 'engineer').get(`${base()}/instruments/TI-999/history`)).status).toBe(404);
  expect((await api(w, 'engineer').get(`${base()}/instruments/TI-102A/history?from=yesterday`)).status).toBe(400);
  expect(
    (await api(w, 'engineer').get(`${base()}/instruments/TI-102A/history?from=2030-01-02&to=2030-01-01`)).status,
  ).toBe(400);
  expect((await api(w, 'tech').get(`${base()}/instruments/TI-102A/history`)).status).toBe(403);
  expect((await api(w, 'brackPlanner').get(`${base()}/instruments/TI-102A/history`)).status).toBe(404);
});

test('one order by evidence since calibration: TI-102A first, its status never "in service ✓", its bias in °C', async () => {
  const all = await health();
  const a = all.instruments[0];
  expect(a.tag).toBe('TI-102A');
  // Page's CUSUM (k = 1, h = 6) over its six rounds, no calibration record since: four of them
  // 10σ high (each clipped to u = 5: +4 a round), two at design (−1 each, floored at 0) → ≥ 6
  expect(a.evidence).toMatchObject({ level: 'strong', direction: 'high', rounds: 6, threshold: 6, since: null });
  expect(a.evidence.cusum).toBeGreaterThanOrEqual(6);
  expect(healthMark(a.status, a.evidence).word).toBe('Suspect');
  // the bias: mean (reading − estimate) over the five rounds of the window, in the gauge's °C, its
  // expanded uncertainty (k = 2) to two significant digits (GUM §7.2.6)
  expect(biasInWords(a.quantity, a.gaugeUnit, a.biasSi30d, a.biasUncertaintySi30d)).toMatch(
    /^reads \d\.\d °C high \(± \d\.\d °C, 95 %\)$/,
  );
  // no calibration record in this world: nothing confirms or refutes
  expect(a.calibrations).toEqual({ closed: 0, confirmed: 0, refuted: 0 });
  // the list is in the one order, evidence strongest first
  const rank = all.instruments.map((i) => (i.evidence.level === 'untested' ? 1.5 : i.evidence.cusum));
  for (let k = 1; k < rank.length; k++) expect(rank[k]).toBeLessThanOrEqual(rank[k - 1]);
  // no instrument with strong evidence against it reads "in service ✓"
  for (const i of all.instruments)
    if (i.evidence.level === 'strong') expect(healthMark(i.status, i.evidence).glyph).not.toBe('✓');
  // a fault-free pressure gauge of the window: bar on its face; its bias is no evidence, in bar
  const p = all.instruments.find((i) => i.tag === 'PI-101')!;
  expect(p).toMatchObject({ gaugeUnit: 'bar', reference: 'gauge' });
  expect(biasInWords(p.quantity, p.gaugeUnit, p.biasSi30d, p.biasUncertaintySi30d)).toMatch(
    /^no evidence of a bias \(within ± 0\.\d+ bar, 95 %\)$/,
  );
  expect(healthMark(p.status, p.evidence).word).toBe('In service, no evidence against it');
  // a level no balance tests: no tick
  expect(healthMark('ok', all.instruments.find((i) => i.tag === 'LI-101')!.evidence).word).toBe(
    'In service, not tested since calibration',
  );
});

test('history carries the gauge unit and reference and each round’s barometer; a year is allowed', async () => {
  const from = new Date(Date.now() - 365 * DAY).toISOString().slice(0, 10);
  const res = await api(w, 'engineer').get(`${base()}/instruments/PI-101/history?from=${from}`);
  expect(res.status).toBe(200);
  const h = res.body as InstrumentHistoryResponse;
  expect(h.instrument).toMatchObject({ gaugeUnit: 'bar', reference: 'gauge' });
  expect(h.points).toHaveLength(6);
  // the analyses used the site's standard atmosphere or the round's barometer: 80–110 kPa
  for (const pt of h.points) expect(pt.barometricPa!).toBeGreaterThan(80_000);
  for (const pt of h.points) expect(pt.barometricPa!).toBeLessThan(110_000);
});
