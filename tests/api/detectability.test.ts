/**
 * The detectability map over the API, on a real PostgreSQL: one round of the Fernhallow demo unit
 * at design (noise ±0.2σ) analysed, then GET /api/sites/:siteId/detectability. The expected set of
 * instruments no balance can check is the domain test's (tests/unit/cycle/detectability.test.ts,
 * closed forms there); here it must come back from the stored analysis, with MDBs in SI and the
 * remedy of an unchecked thermometer (a twin: r = 1/2, MDB = δ0·σ·√2, closed form by hand).
 */
import type { DetectabilityResponse } from '../../shared/api/detectability';
import { runAnalysisJob } from '../../server/analysis/job';
import { demoUnit } from '../../demo/unit';
import { memoryLogger } from './helpers/app';
import { api, makeWorld, pushRound, type World } from './analysis-helpers';

let w: World;
let roundId: string;
beforeAll(async () => {
  w = await makeWorld();
  const r = await pushRound(w, { seed: 14 });
  roundId = r.roundId;
  expect(
    (await runAnalysisJob({ dataSource: w.db.dataSource, logger: memoryLogger('silent').logger }, r.roundId)).status,
  ).toBe('stored');
});
afterAll(() => w?.db.drop());

test('the demo unit: what no balance checks, MDBs in SI, and the remedy of each', async () => {
  const res = await api(w, 'engineer').get(`/api/sites/${w.fernId}/detectability`);
  expect(res.status).toBe(200);
  const body = res.body as DetectabilityResponse;
  expect(body.units).toHaveLength(1);
  const u = body.units[0];
  expect(u.roundId).toBe(roundId);
  expect(u.delta0).toBeCloseTo(2.8016, 4);
  expect(u.instruments.map((i) => i.tag)).toEqual(demoUnit.instruments.map((i) => i.tag));
  const unchecked = u.instruments
    .filter((i) => i.status === 'unchecked')
    .map((i) => i.tag)
    .sort();
  expect(unchecked).toEqual(['LI-101', 'LI-201', 'LI-301', 'LI-401', 'PI-103', 'PI-203', 'TI-103', 'TI-204', 'TI-207']);
  const t103 = u.instruments.find((i) => i.tag === 'TI-103')!;
  expect(t103.remedy).toMatchObject({ kind: 'twin', of: 'TI-103' });
  expect(t103.remedy!.mdb).toBeCloseTo(u.delta0 * t103.sigma! * Math.SQRT2, 6);
  // a checked one: MDB = δ0·σ/√r, SI (kelvin)
  const t301 = u.instruments.find((i) => i.tag === 'TI-301')!;
  expect(t301.status).toBe('checked');
  expect(t301.mdb!).toBeCloseTo((u.delta0 * t301.sigma!) / Math.sqrt(t301.redundancy!), 8);

  // the same map again (cached) and by unit
  const again = await api(w, 'admin').get(`/api/sites/${w.fernId}/detectability?unitId=${u.unitId}`);
  expect(again.status).toBe(200);
  expect(again.body).toEqual(body);
});

test('a unit id that is not a UUID names the field; another site’s unit is not found', async () => {
  const bad = await api(w, 'engineer').get(`/api/sites/${w.fernId}/detectability?unitId=nope`);
  expect(bad.status).toBe(400);
  expect(JSON.stringify(bad.body)).toContain('unitId');
  const other = await api(w, 'engineer').get(
    `/api/sites/${w.fernId}/detectability?unitId=00000000-0000-4000-8000-000000000000`,
  );
  expect(other.status).toBe(404);
});
