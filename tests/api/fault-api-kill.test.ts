/**
 * Fault: the API process is killed (SIGKILL, no clean shutdown) in the middle of a big push.
 *
 * The push is one transaction (server/sync/push.ts), so PostgreSQL rolls back whatever the dead
 * process had written when its connection drops (PostgreSQL docs, "Transactions": a transaction
 * not committed is not seen by anyone). To be sure the kill lands inside the transaction, the test
 * holds a SHARE lock on `readings` (PostgreSQL docs, "Explicit Locking": SHARE conflicts with the
 * ROW EXCLUSIVE an INSERT takes): the push's rounds are written, its readings insert waits, and the
 * process is killed while pg_stat_activity shows it waiting. The client then retries the very same
 * batch (the same ids are the idempotency keys) with the sync client's own failure rule and
 * backoff (offline/sync.ts classifyFailure, offline/backoff.ts) until the restarted server takes it.
 */
import { Client } from 'pg';
import { classifyFailure } from '../../offline/sync';
import { backoffDelay } from '../../offline/backoff';
import type { PushRequestV2, PushResponse } from '../../shared/api/sync';
import { until } from './analysis-helpers';
import { createTestDatabase, type TestDb } from './helpers/db';
import {
  buildRound,
  freePort,
  http,
  roundMaker,
  signInHttp,
  startChildServer,
  stopChild,
  storedCounts,
  techEmail,
  type ChildServer,
} from './fault-helpers';

jest.setTimeout(60_000);

let db: TestDb;
let server: ChildServer | null = null;
let locker: Client | null = null;

beforeAll(async () => {
  db = await createTestDatabase();
});
afterAll(async () => {
  await stopChild(server);
  await locker?.end().catch(() => undefined);
  await db?.drop();
});

test('SIGKILL of the server mid-push: nothing of the batch stays; the retried batch is stored once, every round with all its readings', async () => {
  const port = await freePort();
  server = await startChildServer(db.url, port, { WORKERS_IN_PROCESS: 'false' });
  const token = await signInHttp(server.url, techEmail());
  const m = await roundMaker(db.dataSource);

  // one big batch: 40 rounds of the Fernhallow turbine-hall route, 41 readings each (1680 items of 2000 allowed)
  const built = Array.from({ length: 40 }, (_, i) => buildRound(m, { seed: 1000 + i }));
  const body: PushRequestV2 = {
    ...built[0].body,
    deviceId: 'fault-api-kill-phone',
    rounds: built.flatMap((b) => b.body.rounds),
    readings: built.flatMap((b) => b.body.readings),
  };
  const roundIds = built.map((b) => b.roundId);
  const perRound = built[0].body.readings.length;
  expect(perRound).toBe(41);

  locker = new Client({ connectionString: db.url });
  await locker.connect();
  await locker.query('BEGIN');
  await locker.query('LOCK TABLE readings IN SHARE MODE');

  const first = http(server.url, '/api/sync/push', token, body);
  // the push is inside its transaction, its rounds inserted, its readings insert waiting on our lock
  // (pg_stat_activity may still show the previous statement while a lock is awaited at parse time: ask pg_locks)
  await until('the push to wait on the readings lock', async () => {
    const r = await locker!.query(
      `SELECT count(*)::int AS n FROM pg_locks l JOIN pg_stat_activity a ON a.pid = l.pid
        WHERE a.application_name = 'trueround-server' AND NOT l.granted AND l.relation = 'readings'::regclass AND l.mode = 'RowExclusiveLock'`,
    );
    return (r.rows[0] as { n: number }).n > 0;
  });
  const [{ n: inFlight }] = (
    await locker.query(`SELECT count(*)::int AS n FROM rounds WHERE id = ANY($1::uuid[])`, [roundIds])
  ).rows as { n: number }[];
  expect(inFlight).toBe(0); // the dead transaction's rounds are not visible (not committed)

  server.child.kill('SIGKILL');
  expect((await server.exited).signal).toBe('SIGKILL');
  const lost = await first;
  expect(lost.status).toBe(0); // the socket closed under the client: no response at all
  expect(classifyFailure(lost)).toBe('retry');

  await locker.query('ROLLBACK');
  // the orphaned backend finds its client gone and rolls back (no COMMIT was ever sent)
  await until('the killed push’s backend to end', async () => {
    const r = await locker!.query(
      `SELECT count(*)::int AS n FROM pg_stat_activity WHERE datname = current_database() AND application_name = 'trueround-server'`,
    );
    return (r.rows[0] as { n: number }).n === 0;
  });
  const afterKill = await storedCounts(db.dataSource, roundIds);
  expect(afterKill.rounds.size).toBe(0);
  expect([...afterKill.readings.values()].every((n) => n === 0)).toBe(true);

  // the device retries while the server restarts: network errors first, then the stored batch
  const restart = (async () => {
    await new Promise((r) => setTimeout(r, 500));
    server = await startChildServer(db.url, port, { WORKERS_IN_PROCESS: 'false' });
  })();
  let res = lost;
  let attempts = 0;
  const t = Date.now();
  while (res.status !== 200) {
    expect(classifyFailure(res)).toBe('retry');
    attempts++;
    await new Promise((r) =>
      setTimeout(r, Math.min(backoffDelay(attempts, Math.random, { baseMs: 200, capMs: 1000 }), 1000)),
    );
    res = await http(`http://127.0.0.1:${port}`, '/api/sync/push', token, body);
    if (Date.now() - t > 40_000) throw new Error(`push never went through: ${JSON.stringify(res)}`);
  }
  await restart;
  const applied = (res.body as PushResponse).applied;
  expect(applied).toEqual({ rounds: 40, readings: 40 * perRound, checkAnswers: 0, photos: 0 });

  // and once more (the device never saw the 200, say): all duplicates, nothing new
  const again = await http(server!.url, '/api/sync/push', token, body);
  expect(again.status).toBe(200);
  expect((again.body as PushResponse).duplicates).toEqual({
    rounds: 40,
    readings: 40 * perRound,
    checkAnswers: 0,
    photos: 0,
  });
  expect((again.body as PushResponse).applied.readings).toBe(0);

  const final = await storedCounts(db.dataSource, roundIds);
  expect(final.rounds.size).toBe(40);
  for (const id of roundIds) expect(final.readings.get(id)).toBe(perRound);
  expect(final.duplicateIds).toBe(0);
  const [{ n: distinct }] = (await db.dataSource.query(
    `SELECT count(DISTINCT id)::int AS n FROM readings WHERE id = ANY($1::uuid[])`,
    [body.readings.map((r) => r.id)],
  )) as { n: number }[];
  expect(distinct).toBe(body.readings.length);
});
