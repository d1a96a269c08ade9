/**
 * One instrument master (shared/cycle/instrument-master.ts): an admin's edit of an instrument row
 * (PATCH /api/sites/:siteId/instruments/:instrumentId) reaches the next analysis of a round
 * (server/analysis/job.ts), on a real PostgreSQL.
 *
 * Sources: IEC 60751:2008 tolerance classes of platinum resistance thermometers, class A
 * ±(0.15 + 0.002·|t|) °C and class B ±(0.30 + 0.005·|t|) °C (quoted from memory of the standard's
 * table 1); a tolerance taken as the half-width of a rectangular distribution, σ = a/√3, and a
 * reading resolution δ as σ = δ/√12 (GUM, JCGM 100:2008, 4.3.7 and F.2.2.1), combined in
 * quadrature (GUM 5.1.2). A reading 30σ off is a gross error by the VDI 2048 part 1 measurement test.
 */
import { runAnalysisJob, type AnalysisDeps } from '../../server/analysis/job';
import { demoUnit } from '../../demo/unit';
import { memoryLogger } from './helpers/app';
import { api, makeWorld, pushRound, type World } from './analysis-helpers';
import request from 'supertest';
import { bearer } from './helpers/app';

jest.setTimeout(60_000);

let w: World;
let deps: AnalysisDeps;
beforeAll(async () => {
  w = await makeWorld();
  deps = { dataSource: w.db.dataSource, logger: memoryLogger('warn').logger };
});
afterAll(() => w?.db.drop());

interface StoredAnalysis {
  id: string;
  model_version: string;
  instruments: { tag: string; sigma: number | null }[];
  reconciliation: { ok: boolean; outOfService?: string[] };
}

async function analysed(roundId: string): Promise<StoredAnalysis> {
  const out = await runAnalysisJob(deps, roundId);
  expect(out.status).toBe('stored');
  const [row] = (await w.db.dataSource.query(
    `SELECT "id", "model_version", "instruments", "reconciliation" FROM "analyses" WHERE "round_id" = $1 AND "is_current"`,
    [roundId],
  )) as StoredAnalysis[];
  return row;
}

async function findingsOf(analysisId: string) {
  return (await w.db.dataSource.query(
    `SELECT "kind", "instrument_tags" AS "tags", "message" FROM "findings" WHERE "analysis_id" = $1 ORDER BY "ordinal"`,
    [analysisId],
  )) as { kind: string; tags: string[]; message: string }[];
}

const patch = (tag: string, body: object) =>
  request(w.app).patch(`/api/sites/${w.fernId}/instruments/${w.inst[tag]}`).set(bearer(w.tokens.admin)).send(body);

const sigmaOf = (a: StoredAnalysis, tag: string) => a.instruments.find((i) => i.tag === tag)?.sigma ?? null;

test("an admin's accuracy-class change reaches the next analysis: σ follows IEC 60751 class B; the version moves", async () => {
  const before = await analysed((await pushRound(w)).roundId);
  const sA = sigmaOf(before, 'TI-205')!;
  expect(demoUnit.instruments.find((i) => i.tag === 'TI-205')!.accuracy).toEqual({
    kind: 'iec60751',
    class: 'A',
    resolution: 0.2,
  });
  // the temperature σ was taken at: class A's tolerance a = 0.15 + 0.002·|t| with δ = 0.2 K
  const res2 = 0.2 ** 2 / 12;
  const aA = Math.sqrt(3) * Math.sqrt(sA * sA - res2);
  const t = (aA - 0.15) / 0.002;
  expect(t).toBeGreaterThan(0);
  expect(t).toBeLessThan(150); // the condensate after the pump, below the LP heater's outlet (demo design)

  const res = await patch('TI-205', { accuracyClass: 'B' });
  expect(res.status).toBe(200);
  const after = await analysed((await pushRound(w)).roundId);
  const sB = sigmaOf(after, 'TI-205')!;
  const expected = Math.sqrt(((0.3 + 0.005 * t) / Math.sqrt(3)) ** 2 + res2);
  expect(sB).toBeCloseTo(expected, 9);
  expect(sB / sA).toBeGreaterThan(2);
  // the analysis records the effective version: the published one while the rows agree with the
  // model (the seed), a new one after the edit
  expect(before.model_version).toBe(demoUnit.version);
  expect(after.model_version).not.toBe(before.model_version);
  expect(after.model_version).toMatch(/^fnv1a64:[0-9a-f]{16}$/);
});

test('an out-of-service instrument is not reconciled: the stored analysis leaves it out and says so', async () => {
  // control: 30σ high (about 5 K) while in service, the reconciliation names it
  const control = await analysed((await pushRound(w, { bias: { 'TI-206': 30 } })).roundId);
  expect(control.reconciliation.outOfService).toEqual([]);
  expect(sigmaOf(control, 'TI-206')).not.toBeNull();
  expect((await findingsOf(control.id)).some((f) => f.kind === 'gross-error' && f.tags.includes('TI-206'))).toBe(true);

  expect((await patch('TI-206', { status: 'out-of-service' })).status).toBe(200);
  const r = await pushRound(w, { bias: { 'TI-206': 30 } });
  const a = await analysed(r.roundId);
  expect(a.reconciliation.ok).toBe(true);
  expect(a.reconciliation.outOfService).toEqual(['TI-206']);
  expect(a.instruments.map((i) => i.tag)).not.toContain('TI-206');
  expect(a.instruments.length).toBe(demoUnit.instruments.length - 1);
  expect(a.model_version).not.toBe(control.model_version);
  const found = await findingsOf(a.id);
  expect(found.filter((f) => f.tags.includes('TI-206')).map((f) => f.kind)).toEqual(['instrument-out-of-service']);
  expect(found.find((f) => f.kind === 'instrument-out-of-service')!.message).toBe(
    'TI-206 is out of service: its readings are not reconciled and no balance checks them in this analysis.',
  );
  const rows = (await w.db.dataSource.query(
    `SELECT count(*)::int AS n FROM "analysis_instruments" WHERE "analysis_id" = $1 AND "instrument_id" = $2`,
    [a.id, w.inst['TI-206']],
  )) as { n: number }[];
  expect(rows[0].n).toBe(0);
  // the stored reading itself is kept (nothing already stored is lost)
  const kept = (await w.db.dataSource.query(`SELECT count(*)::int AS n FROM "readings" WHERE "id" = $1`, [
    r.readingIds['TI-206'],
  ])) as { n: number }[];
  expect(kept[0].n).toBe(1);
  // the API's view of the same analysis
  const view = await api(w, 'engineer').get(`/api/sites/${w.fernId}/rounds/${r.roundId}/analysis`);
  expect(view.status).toBe(200);
  expect((view.body as { modelVersion: string }).modelVersion).toBe(a.model_version);
});
