/**
 * Sequential evidence before a work order, on a real PostgreSQL (server/analysis/evidence.ts,
 * shared/cycle/evidence.ts): a bias too small for one round to call opens an order once its own
 * rounds have accumulated the evidence, and a calibration record resets that evidence.
 *
 * Sources: Page, "Continuous inspection schemes", Biometrika 41 (1954) — the two-sided CUSUM
 * S_n = max(0, S_{n−1} + u_n − k), alarm at S ≥ h, here k = 1, h = 6. The rounds are the demo
 * unit's design point (IAPWS-IF97, every balance closing) with ±0.2σ uniform noise, TI-203
 * (deaerator steam after the reducing valve, W ≈ 0.93) moved by 2 σ: its test value is
 * u ≈ 2·√0.93 ≈ 1.93, so the sum grows by ≈ 0.93 a round (5.6 after 6 rounds) and passes 6 on the
 * 7th — the test's own arithmetic on what it put in.
 */
import type { WorkOrderListResponse } from '../../shared/api/work-orders';
import { runAnalysisJob, type AnalysisDeps } from '../../server/analysis/job';
import { memoryLogger } from './helpers/app';
import { api, makeWorld, pushRound, type World } from './analysis-helpers';

let w: World;
let deps: AnalysisDeps;
const base = () => `/api/sites/${w.fernId}`;
const HOUR = 3_600_000;
let clock = Date.now() - 200 * HOUR;

beforeAll(async () => {
  w = await makeWorld();
  deps = { dataSource: w.db.dataSource, logger: memoryLogger('silent').logger };
});
afterAll(() => w?.db.drop());

async function biasedRound() {
  clock += 8 * HOUR;
  const r = await pushRound(w, { bias: { 'TI-203': 2 }, deviceTime: new Date(clock).toISOString() });
  const out = await runAnalysisJob(deps, r.roundId);
  expect(out.status).toBe('stored');
  const findings = (await w.db.dataSource.query(
    `SELECT "kind", "instrument_tags" AS "tags", "evidence" FROM "findings" WHERE "round_id" = $1`,
    [r.roundId],
  )) as {
    kind: string;
    tags: string[];
    evidence: Record<string, unknown>;
  }[];
  return { ...r, out, findings };
}
const orders = async () =>
  ((await api(w, 'planner').get(`${base()}/work-orders?status=active`)).body as WorkOrderListResponse).items;

test('a 2σ bias opens no order on its first 6 rounds and one calibrate order on its 7th, by the accumulated evidence', async () => {
  for (let k = 1; k <= 6; k++) {
    const r = await biasedRound();
    expect(r.out.status === 'stored' && r.out.workOrders.opened).toEqual([]);
    expect(r.findings.filter((f) => f.kind === 'sustained-bias')).toEqual([]);
  }
  const r = await biasedRound();
  const sb = r.findings.find((f) => f.kind === 'sustained-bias')!;
  expect(sb.tags).toEqual(['TI-203']);
  expect(sb.evidence).toMatchObject({ threshold: 6, reference: 1, rounds: 7, direction: 'high' });
  expect(sb.evidence.cusum as number).toBeGreaterThan(6);
  expect(sb.evidence.cusum as number).toBeLessThan(8);
  expect(r.out.status === 'stored' && r.out.workOrders.opened).toHaveLength(1);
  expect((await orders()).map((o) => [o.kind, o.instrumentTag])).toEqual([['calibrate', 'TI-203']]);
});

test('the calibration record closes the loop: the evidence starts again from zero', async () => {
  const [wo] = await orders();
  const p = api(w, 'planner');
  expect((await p.post(`${base()}/work-orders/${wo.id}/triage`, {})).status).toBe(200);
  expect(
    (await p.post(`${base()}/work-orders/${wo.id}/schedule`, { scheduledFor: new Date().toISOString().slice(0, 10) }))
      .status,
  ).toBe(200);
  expect((await p.post(`${base()}/work-orders/${wo.id}/start`, {})).status).toBe(200);
  const today = new Date().toISOString().slice(0, 10);
  const closed = await p.post(`${base()}/work-orders/${wo.id}/close`, {
    calibration: { asFound: 1, asLeft: 0, calibratedOn: today },
  });
  expect(closed.status).toBe(200);
  // the bias is still there (the test did not move the reading back): 6 more rounds are not evidence enough again
  for (let k = 1; k <= 6; k++) {
    const r = await biasedRound();
    expect(r.out.status === 'stored' && [...r.out.workOrders.opened, ...r.out.workOrders.reopened]).toEqual([]);
  }
  const r = await biasedRound();
  expect(r.findings.find((f) => f.kind === 'sustained-bias')?.evidence.rounds).toBe(7);
});
