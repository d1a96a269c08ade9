/**
 * Fault: PostgreSQL goes away under a running server and comes back (a restart of the cluster).
 *
 * A private cluster (scripts/pg.mjs with its own TR_PG_PORT and TR_PG_DIR) so the shared test
 * cluster the other API files use is never touched. The server runs as a child process while a
 * loop pushes distinct rounds; the cluster is stopped (`pg_ctl stop -m fast`: backends are
 * terminated, open transactions roll back — PostgreSQL docs, "Shutting Down the Server"), kept
 * down a while and started again. During the outage every push and /api/health answer 503 with
 * the error shape and a Retry-After header (RFC 9110 §15.6.4 and §10.2.3); the process lives on;
 * afterwards pushes succeed, and every round is stored with all its readings or not at all.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { ApiError } from '../../shared/api/errors';
import type { PushResponse } from '../../shared/api/sync';
import { makeDataSource } from '../../server/db';
import { seedDemo } from '../../server/seed/demo';
import {
  buildRound,
  freePort,
  http,
  ROOT,
  roundMaker,
  signInHttp,
  startChildServer,
  stopChild,
  storedCounts,
  techEmail,
  type ChildServer,
} from './fault-helpers';
import type { BuiltRound } from './analysis-helpers';

jest.setTimeout(60_000);

let dir = '';
let pgPort = 0;
let server: ChildServer | null = null;
let ds: DataSource | null = null;
const bin = () => {
  const base = '/usr/lib/postgresql';
  const major = readdirSync(base).sort((a, b) => Number(b) - Number(a))[0];
  return join(base, major, 'bin');
};
const isRoot = () => process.getuid?.() === 0;
const pgEnv = () => ({ ...process.env, TR_PG_PORT: String(pgPort), TR_PG_DIR: dir });
const clusterStart = () =>
  execFileSync(process.execPath, [join(ROOT, 'scripts/pg.mjs'), 'start', '--test'], { env: pgEnv(), stdio: 'pipe' });
const clusterStop = () => {
  const args = ['-D', join(dir, 'data'), '-m', 'fast', '-w', 'stop'];
  if (isRoot()) execFileSync('runuser', ['-u', 'postgres', '--', join(bin(), 'pg_ctl'), ...args], { stdio: 'pipe' });
  else execFileSync(join(bin(), 'pg_ctl'), args, { stdio: 'pipe' });
};
const dbUrl = () => `postgres://trueround@127.0.0.1:${pgPort}/trueround_test`;

beforeAll(async () => {
  // scripts/pg.mjs chowns the folder to the postgres user when run as root; /tmp lets it through
  dir = mkdtempSync(join(tmpdir(), 'tr-fault-pg-'));
  pgPort = await freePort();
  clusterStart();
  ds = makeDataSource(dbUrl(), { poolSize: 2, applicationName: 'trueround-api-test' });
  await ds.initialize();
  await ds.runMigrations();
  await seedDemo(ds);
}, 60_000);

afterAll(async () => {
  await stopChild(server);
  if (ds?.isInitialized) await ds.destroy().catch(() => undefined);
  try {
    clusterStop();
  } catch {
    /* already down */
  }
  if (dir) rmSync(dir, { recursive: true, force: true });
});

test('PostgreSQL restarted under a push loop: 503 + Retry-After while it is down, the server lives on, no half round', async () => {
  const m = await roundMaker(ds!);
  server = await startChildServer(dbUrl(), await freePort(), { WORKERS_IN_PROCESS: 'false' });
  const token = await signInHttp(server.url, techEmail());

  const rounds: BuiltRound[] = [];
  const outcome = new Map<string, number>();
  const outage: { status: number; retryAfter: string | null; code: string | null }[] = [];
  let healthDuringOutage: { status: number; retryAfter: string | null; code: string | null } | null = null;
  type Phase = 'before' | 'down' | 'after';
  // set by the test body while the loop runs (a function call so TypeScript does not narrow it)
  let phaseNow: Phase = 'before';
  const phase = (): Phase => phaseNow;
  let okAfter = 0;

  const loop = (async () => {
    for (let i = 0; okAfter < 5 && i < 400; i++) {
      const r = buildRound(m, { seed: 5000 + i });
      rounds.push(r);
      const p = phase();
      const res = await http(server!.url, '/api/sync/push', token, { ...r.body, deviceId: 'fault-pg-phone' });
      outcome.set(r.roundId, res.status);
      if (p === 'down' && phase() === 'down') {
        const code = ApiError.safeParse(res.body).success ? (res.body as ApiError).error.code : null;
        outage.push({ status: res.status, retryAfter: res.headers.get('retry-after'), code });
      }
      if (phase() === 'after' && res.status === 200) okAfter++;
      if (res.status !== 200) await new Promise((t) => setTimeout(t, 100));
    }
  })();

  while (rounds.length < 5) await new Promise((t) => setTimeout(t, 50));
  clusterStop();
  phaseNow = 'down';
  await new Promise((t) => setTimeout(t, 2500));
  const h = await http(server.url, '/api/health', null);
  healthDuringOutage = {
    status: h.status,
    retryAfter: h.headers.get('retry-after'),
    code: ApiError.safeParse(h.body).success ? (h.body as ApiError).error.code : null,
  };
  clusterStart();
  phaseNow = 'after';
  await loop;

  expect(server.alive()).toBe(true);
  expect(healthDuringOutage).toEqual({ status: 503, retryAfter: '5', code: 'db_unavailable' });
  expect(outage.length).toBeGreaterThan(3);
  for (const o of outage) expect(o).toEqual({ status: 503, retryAfter: '5', code: 'db_unavailable' });
  expect(okAfter).toBe(5);
  expect((await http(server.url, '/api/health', null)).status).toBe(200);

  // nothing half-written: each round is stored with all its 41 readings, or not at all
  const ids = rounds.map((r) => r.roundId);
  let stored = await storedCounts(ds!, ids);
  for (const id of ids) expect([0, 41]).toContain(stored.readings.get(id));
  for (const id of ids) expect(stored.readings.get(id) === 41).toBe(stored.rounds.has(id));
  for (const r of rounds) if (outcome.get(r.roundId) === 200) expect(stored.rounds.has(r.roundId)).toBe(true);

  // the device resends what failed, with the same ids: everything ends up stored once
  for (const r of rounds.filter((x) => outcome.get(x.roundId) !== 200)) {
    const res = await http(server.url, '/api/sync/push', token, { ...r.body, deviceId: 'fault-pg-phone' });
    expect(res.status).toBe(200);
    expect((res.body as PushResponse).applied.readings + (res.body as PushResponse).duplicates.readings).toBe(41);
  }
  stored = await storedCounts(ds!, ids);
  expect(stored.rounds.size).toBe(ids.length);
  for (const id of ids) expect(stored.readings.get(id)).toBe(41);
  expect(stored.duplicateIds).toBe(0);
  expect(server.output()).not.toMatch(/uncaught|unhandled/i);
});
