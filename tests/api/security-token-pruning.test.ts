/**
 * Refresh-token rows that can never be used again are pruned on a pg-boss schedule
 * (server/auth/prune.ts). What must stay: every row of a family that still holds a live token,
 * until that row expires — presenting a retired token again is how a leaked token is recognised
 * (OAuth 2.0 Security BCP, RFC 9700 §4.14.2, refresh token rotation with reuse detection), so the
 * row has to be there to be recognised.
 */
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { startAnalysisRuntime } from '../../server/analysis/queue';
import { PRUNE_CRON, PRUNE_GRACE_MS, PRUNE_QUEUE, pruneRefreshTokens } from '../../server/auth/prune';
import { memoryLogger, signIn, testApp, testConfig } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

jest.setTimeout(60_000);

let db: TestDb;
let userId: string;
beforeAll(async () => {
  db = await createTestDatabase();
  [{ id: userId }] = (await db.dataSource.query(
    `SELECT "id" FROM "users" WHERE "email" = 'tech@fernhallow.example'`,
  )) as { id: string }[];
});
afterAll(() => db?.drop());

const NOW = new Date('2026-12-04T12:00:00Z');
const hours = (h: number) => new Date(NOW.getTime() + h * 3600_000);

async function token(family: string, expiresAt: Date, revokedAt: Date | null): Promise<string> {
  const [r] = (await db.dataSource.query(
    `INSERT INTO "refresh_tokens" ("user_id", "token_hash", "family_id", "expires_at", "revoked_at") VALUES ($1, $2, $3, $4, $5) RETURNING "id"`,
    [userId, randomUUID().replace(/-/g, '') + randomUUID().replace(/-/g, ''), family, expiresAt, revokedAt],
  )) as { id: string }[];
  return r.id;
}

test('prunes expired rows and dead families past the grace; keeps a live family whole and anything spent within the last day', async () => {
  const live = randomUUID();
  const dead = randomUUID();
  const fresh = randomUUID();
  const rows = {
    liveCurrent: await token(live, hours(24 * 29), null),
    liveRetired: await token(live, hours(24 * 20), hours(-48)), // retired 2 days ago; its family lives: kept for reuse detection
    liveExpired: await token(live, hours(-30), hours(-24 * 31)), // expired 30 h ago: can never refresh again
    deadRetired: await token(dead, hours(24 * 10), hours(-25)), // signed out 25 h ago, nothing live in the family
    deadRetired2: await token(dead, hours(24 * 9), hours(-40)),
    freshlyRetired: await token(fresh, hours(24 * 10), hours(-2)), // signed out 2 h ago: within the grace
    justExpired: await token(randomUUID(), hours(-1), null), // expired an hour ago: within the grace
  };
  const deleted = await pruneRefreshTokens(db.dataSource, NOW);
  const left = new Set(
    (
      (await db.dataSource.query(`SELECT "id" FROM "refresh_tokens" WHERE "id" = ANY($1::uuid[])`, [
        Object.values(rows),
      ])) as { id: string }[]
    ).map((r) => r.id),
  );
  const kept = Object.fromEntries(Object.entries(rows).map(([k, id]) => [k, left.has(id)]));
  expect(kept).toEqual({
    liveCurrent: true,
    liveRetired: true,
    liveExpired: false,
    deadRetired: false,
    deadRetired2: false,
    freshlyRetired: true,
    justExpired: true,
  });
  expect(deleted).toBe(3);
  expect(PRUNE_GRACE_MS).toBe(24 * 3600_000);
});

test('a session in use keeps refreshing after a pruning run (its live token and its history are kept)', async () => {
  const app = testApp(db.dataSource, db.url);
  const s = await signIn(app, 'engineer@fernhallow.example');
  const r1 = await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken });
  expect(r1.status).toBe(200);
  await pruneRefreshTokens(db.dataSource);
  const r2 = await request(app).post('/api/auth/refresh').send({ refreshToken: r1.body.refreshToken });
  expect(r2.status).toBe(200);
  // the retired first token still trips reuse detection: the family ends
  expect((await request(app).post('/api/auth/refresh').send({ refreshToken: s.refreshToken })).status).toBe(401);
  expect((await request(app).post('/api/auth/refresh').send({ refreshToken: r2.body.refreshToken })).status).toBe(401);
});

test('a process that runs workers puts the pruning on its pg-boss schedule (hourly, UTC) and works its queue', async () => {
  const runtime = await startAnalysisRuntime({
    config: testConfig(db.url, { ANALYSIS_SWEEP_INTERVAL_S: '0', ANALYSIS_CONCURRENCY: '1' }),
    dataSource: db.dataSource,
    logger: memoryLogger('silent').logger,
    work: true,
    poolSize: 2,
  });
  try {
    const schedules = (await db.dataSource.query(
      `SELECT "name", "cron", "timezone" FROM "pgboss"."schedule" WHERE "name" = $1`,
      [PRUNE_QUEUE],
    )) as {
      name: string;
      cron: string;
      timezone: string;
    }[];
    expect(schedules).toEqual([{ name: PRUNE_QUEUE, cron: PRUNE_CRON, timezone: 'UTC' }]);
    // a run of the job, as the schedule would send it, prunes
    const doomed = await token(randomUUID(), new Date(Date.now() - 3 * PRUNE_GRACE_MS), null);
    const jobId = await runtime.boss.send(PRUNE_QUEUE, {});
    expect(jobId).toBeTruthy();
    for (let i = 0; i < 100; i++) {
      const [row] = (await db.dataSource.query(`SELECT count(*)::int AS n FROM "refresh_tokens" WHERE "id" = $1`, [
        doomed,
      ])) as { n: number }[];
      if (row.n === 0) break;
      await new Promise((r) => setTimeout(r, 200));
    }
    const job = await runtime.boss.getJobById(PRUNE_QUEUE, jobId!);
    expect(job?.state).toBe('completed');
    expect((job?.output as { deleted: number }).deleted).toBeGreaterThanOrEqual(1);
  } finally {
    await runtime.stop();
  }
});
