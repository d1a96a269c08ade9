/**
 * Fault: devices whose clocks are 3 h ahead and 3 h behind push rounds. The server orders what
 * it receives by its own sequence (server_seq from sync_seq) and receive time, never by device
 * times (shared/api/sync.ts: "Device times are kept as evidence, never used for order"), so the
 * order of arrival stands and the pull cursor is untouched: a pull from the cursor returns each
 * changed row once. The skew (device clock − server receive time) is recorded on the round and
 * shown with its analysis (clockSkewS, seconds).
 */
import request from 'supertest';
import type { PullResponse } from '../../shared/api/sync';
import type { RoundAnalysisResponse } from '../../shared/api/analysis';
import { runAnalysisJob } from '../../server/analysis/job';
import { api, designRound, makeWorld, push, type World } from './analysis-helpers';
import { bearer, memoryLogger } from './helpers/app';

jest.setTimeout(60_000);

let w: World;
beforeAll(async () => {
  w = await makeWorld();
});
afterAll(() => w?.db.drop());

const H3 = 3 * 3600 * 1000;
const pull = async (cursor: number) => {
  const res = await request(w.app).get(`/api/sync/pull?siteId=${w.fernId}&cursor=${cursor}`).set(bearer(w.tokens.tech));
  expect(res.status).toBe(200);
  return res.body as PullResponse;
};

test('rounds from clocks 3 h ahead and 3 h behind: arrival order kept, skew recorded and shown, pull cursor unaffected', async () => {
  const p0 = await pull(0);
  expect(p0.instruments.length).toBeGreaterThan(0);
  const cursor0 = p0.cursor;

  // arrival order: ahead, behind, on time — device times say behind < on time < ahead
  const offsets = { ahead: H3, behind: -H3, onTime: 0 } as const;
  const rounds: Record<keyof typeof offsets, { id: string; sentAt: number }> = {} as never;
  for (const k of ['ahead', 'behind', 'onTime'] as const) {
    const t = new Date(Date.now() + offsets[k]).toISOString();
    const r = designRound(w, { deviceTime: t });
    await push(w, { ...r.body, deviceId: `skew-${k}` });
    rounds[k] = { id: r.roundId, sentAt: Date.parse(t) };
  }

  const rows = (await w.db.dataSource.query(
    `SELECT id, server_seq::bigint AS seq, received_at, started_at_device, client_clock_skew_ms FROM rounds WHERE id = ANY($1::uuid[]) ORDER BY server_seq`,
    [Object.values(rounds).map((r) => r.id)],
  )) as { id: string; seq: string; received_at: Date; started_at_device: Date; client_clock_skew_ms: string }[];
  // server order = arrival order, whatever the device clocks said
  expect(rows.map((r) => r.id)).toEqual([rounds.ahead.id, rounds.behind.id, rounds.onTime.id]);
  expect(rows[0].received_at.getTime()).toBeLessThanOrEqual(rows[1].received_at.getTime());
  expect(rows[1].received_at.getTime()).toBeLessThanOrEqual(rows[2].received_at.getTime());
  // device times kept as sent (evidence)
  expect(rows[0].started_at_device.getTime()).toBe(rounds.ahead.sentAt);
  // stored skew: server receive − device send, ms; within 10 s of ∓3 h (the push itself takes well under that)
  const skewMs = Object.fromEntries(rows.map((r) => [r.id, Number(r.client_clock_skew_ms)]));
  expect(Math.abs(skewMs[rounds.ahead.id] + H3)).toBeLessThan(10_000);
  expect(Math.abs(skewMs[rounds.behind.id] - H3)).toBeLessThan(10_000);
  expect(Math.abs(skewMs[rounds.onTime.id])).toBeLessThan(10_000);

  // the analysis JSON shows it the other way round: device − server, seconds
  const deps = { dataSource: w.db.dataSource, logger: memoryLogger('silent').logger };
  for (const k of ['ahead', 'behind', 'onTime'] as const) {
    await runAnalysisJob(deps, rounds[k].id);
    const res = await api(w, 'engineer').get(`/api/sites/${w.fernId}/rounds/${rounds[k].id}/analysis`);
    expect(res.status).toBe(200);
    const a = res.body as RoundAnalysisResponse;
    expect(a.clockSkewS).toBeCloseTo(-skewMs[rounds[k].id] / 1000, 3);
    expect(Math.abs(a.clockSkewS! - offsets[k] / 1000)).toBeLessThan(10);
  }

  // pushes do not move the reference-data cursor; a change does, and is pulled exactly once
  const p1 = await pull(cursor0);
  expect(p1).toMatchObject({ cursor: cursor0, units: [], instruments: [], routes: [] });
  await w.db.dataSource.query(`UPDATE instruments SET status = 'suspect' WHERE id = $1`, [w.inst['TI-301']]);
  const p2 = await pull(cursor0);
  expect(p2.instruments.map((i) => i.id)).toEqual([w.inst['TI-301']]);
  expect(p2.cursor).toBeGreaterThan(cursor0);
  const p3 = await pull(p2.cursor);
  expect(p3).toMatchObject({ cursor: p2.cursor, units: [], instruments: [], routes: [] });
  // everything from 0 once: each instrument id appears a single time
  const all = await pull(0);
  expect(new Set(all.instruments.map((i) => i.id)).size).toBe(all.instruments.length);
  expect(all.instruments.length).toBe(p0.instruments.length);
});
