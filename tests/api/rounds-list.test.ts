/**
 * The site's analysed rounds (GET /api/sites/:siteId/rounds?analysed=1) and where the readings of
 * a unit-level analysis came from (GET …/rounds/:roundId/analysis readingOrigins).
 *
 * Rounds of the Fernhallow demo unit at its design point (shared/cycle demoDesignReadings,
 * IAPWS-IF97, balances closing), each pushed with only the readings of its own demo route
 * (demo/routes), analysed by the analysis job. Status codes as RFC 9110 gives them: 400
 * (§15.5.1), 403 (§15.5.4), 404 (§15.5.5). The expected counts are the test's own: what it
 * pushed, and the findings rows the job stored.
 */
import { runAnalysisJob } from '../../server/analysis/job';
import { boilerHouseRoute, condenserCoolingWaterRoute, turbineHallRoute } from '../../demo/routes';
import type { RouteTemplate } from '../../shared/route/template';
import type { RoundAnalysisResponse } from '../../shared/api/analysis';
import { AnalysedRoundsResponse } from '../../shared/api/rounds';
import { demoUnit } from '../../demo/unit';
import { memoryLogger } from './helpers/app';
import { api, designRound, push, makeWorld, type RoundOptions, type World } from './analysis-helpers';

let w: World;
const base = () => `/api/sites/${w.fernId}`;
const HOUR = 3_600_000;
const t0 = Date.now() - 48 * HOUR;
const at = (h: number) => new Date(t0 + h * HOUR).toISOString();
const tagsOf = (r: RouteTemplate) => new Set(r.stops.flatMap((s) => s.readings.map((x) => x.tag)));

/** A design round with only the readings its route reads. */
async function routeRound(route: RouteTemplate, o: RoundOptions = {}) {
  const r = designRound(w, { ...o, routeKey: route.id });
  const tags = tagsOf(route);
  const keep = new Set(
    Object.entries(r.readingIds)
      .filter(([tag]) => tags.has(tag))
      .map(([, id]) => id),
  );
  r.body.readings = r.body.readings.filter((x) => keep.has(x.id));
  await push(w, r.body);
  const deps = { dataSource: w.db.dataSource, logger: memoryLogger('silent').logger };
  expect((await runAnalysisJob(deps, r.roundId)).status).toBe('stored');
  return r;
}

let boiler: Awaited<ReturnType<typeof routeRound>>;
let condenser: Awaited<ReturnType<typeof routeRound>>;
let turbine: Awaited<ReturnType<typeof routeRound>>;
let biased: Awaited<ReturnType<typeof routeRound>>;

beforeAll(async () => {
  w = await makeWorld();
  // a shift: boiler house, then condenser, then the turbine hall (which borrows the other two)
  boiler = await routeRound(boilerHouseRoute, { deviceTime: at(0) });
  condenser = await routeRound(condenserCoolingWaterRoute, { deviceTime: at(1) });
  turbine = await routeRound(turbineHallRoute, { deviceTime: at(2) });
  // the next day, a turbine-hall round with TI-102A 10σ high (a gross error the balances name)
  biased = await routeRound(turbineHallRoute, { deviceTime: at(26), bias: { 'TI-102A': 10 } });
  // a round still in progress is not analysed and not listed
  const open = designRound(w, { deviceTime: at(27), status: 'in-progress' });
  await push(w, open.body);
});
afterAll(() => w?.db.drop());

const list = async (q: string, who: 'engineer' | 'planner' = 'engineer') => {
  const res = await api(w, who).get(`${base()}/rounds${q}`);
  expect(res.status).toBe(200);
  return AnalysedRoundsResponse.parse(res.body);
};

test('analysed rounds, newest first, with route, unit, times, finding counts by severity and the model-version flag', async () => {
  const body = await list('?analysed=1');
  expect(body.total).toBe(4);
  expect(body.rounds.map((r) => r.roundId)).toEqual([
    biased.roundId,
    turbine.roundId,
    condenser.roundId,
    boiler.roundId,
  ]);
  expect(body.rounds.map((r) => r.routeName)).toEqual([
    turbineHallRoute.name,
    turbineHallRoute.name,
    condenserCoolingWaterRoute.name,
    boilerHouseRoute.name,
  ]);
  const first = body.rounds[0];
  const [unit] = (await w.db.dataSource.query(`SELECT "name" FROM "units" WHERE "id" = $1`, [first.unitId])) as {
    name: string;
  }[];
  expect(first.unitName).toBe(unit.name);
  expect(body.rounds.every((r) => r.unitId === first.unitId)).toBe(true);
  expect(first.startedAt).toBe(at(26));
  expect(first.finishedAt).toBe(at(26));
  expect(first.modelVersionMismatch).toBe(false);
  // counts against the findings rows the job stored for that analysis
  for (const r of body.rounds) {
    const rows = (await w.db.dataSource.query(`SELECT "severity" FROM "findings" WHERE "analysis_id" = $1`, [
      r.analysisId,
    ])) as { severity: number }[];
    expect(r.findings).toEqual({
      total: rows.length,
      urgent: rows.filter((x) => x.severity === 1).length,
      attend: rows.filter((x) => x.severity === 2).length,
      note: rows.filter((x) => x.severity === 3).length,
    });
  }
  // the biased round has findings naming TI-102A; the planner sees the same list
  expect(first.findings.total).toBeGreaterThan(0);
  expect((await list('?analysed=1', 'planner')).rounds.map((r) => r.roundId)).toEqual(
    body.rounds.map((r) => r.roundId),
  );
});

test('paging: limit and page, the same order, total unchanged', async () => {
  const all = (await list('?analysed=1')).rounds.map((r) => r.roundId);
  const p1 = await list('?analysed=1&limit=3&page=1');
  const p2 = await list('?analysed=1&limit=3&page=2');
  const p3 = await list('?analysed=1&limit=3&page=3');
  expect(p1).toMatchObject({ page: 1, limit: 3, total: 4 });
  expect([...p1.rounds, ...p2.rounds].map((r) => r.roundId)).toEqual(all);
  expect(p3.rounds).toEqual([]);
});

test('bad queries name the field and the limit; roles outside planner and engineer are refused', async () => {
  const q = async (s: string) => api(w, 'engineer').get(`${base()}/rounds${s}`);
  const none = await q('');
  expect(none.status).toBe(400);
  expect(none.body.error.details).toContainEqual({
    path: 'analysed',
    message: 'Must be 1: only analysed rounds are listed',
  });
  const zero = await q('?analysed=1&limit=0');
  expect(zero.status).toBe(400);
  expect(zero.body.error.details).toContainEqual({ path: 'limit', message: 'Must be at least 1' });
  const big = await q('?analysed=1&limit=101');
  expect(big.body.error.details).toContainEqual({ path: 'limit', message: 'Must be at most 100' });
  const word = await q('?analysed=1&page=two');
  expect(word.body.error.details).toContainEqual({ path: 'page', message: 'Must be a whole number from 1 to 10000' });

  expect((await api(w, 'tech').get(`${base()}/rounds?analysed=1`)).status).toBe(403);
  expect((await api(w, 'admin').get(`${base()}/rounds?analysed=1`)).status).toBe(403);
  // a planner of another site: the site does not exist for them
  expect((await api(w, 'brackPlanner').get(`${base()}/rounds?analysed=1`)).status).toBe(404);
});

test('the unit-level analysis of a turbine-hall round holds every state point and says which readings came from the other rounds', async () => {
  const res = await api(w, 'engineer').get(`${base()}/rounds/${turbine.roundId}/analysis`);
  expect(res.status).toBe(200);
  const a = res.body as RoundAnalysisResponse;
  // every state point of the model, not only those the turbine-hall route reads
  expect(a.statePoints.map((p) => p.id).sort()).toEqual(demoUnit.points.map((p) => p.id).sort());
  const origins = new Map(a.readingOrigins!.map((o) => [o.tag, o]));
  const own = tagsOf(turbineHallRoute);
  for (const tag of tagsOf(boilerHouseRoute)) {
    if (own.has(tag) || !demoUnit.instruments.some((i) => i.tag === tag)) continue;
    expect(origins.get(tag)).toMatchObject({
      own: false,
      roundId: boiler.roundId,
      routeName: boilerHouseRoute.name,
      measuredAt: at(0),
    });
  }
  for (const tag of tagsOf(condenserCoolingWaterRoute)) {
    if (own.has(tag) || !demoUnit.instruments.some((i) => i.tag === tag)) continue;
    expect(origins.get(tag)).toMatchObject({
      own: false,
      roundId: condenser.roundId,
      routeName: condenserCoolingWaterRoute.name,
      measuredAt: at(1),
    });
  }
  for (const tag of own) {
    if (!demoUnit.instruments.some((i) => i.tag === tag)) continue;
    expect(origins.get(tag)).toMatchObject({ own: true, roundId: turbine.roundId });
  }
  // the three routes together read every model instrument once
  expect(origins.size).toBe(demoUnit.instruments.length);
  const modelTags = new Set(demoUnit.instruments.map((i) => i.tag));
  expect(a.readingOrigins!.filter((o) => !o.own).length).toBe([...modelTags].filter((t) => !own.has(t)).length);
  expect(a.readingOrigins!.filter((o) => !o.own).length).toBeGreaterThan(5);
  // the boiler-house round, 24 h before the biased round, is outside its 4 h window: nothing borrowed from it
  const b = (await api(w, 'engineer').get(`${base()}/rounds/${biased.roundId}/analysis`)).body as RoundAnalysisResponse;
  expect(b.readingOrigins!.every((o) => o.own)).toBe(true);
});
