/**
 * Syncing a device outbox of 1 000 readings to the real server (loopback, PostgreSQL), through
 * the app's own sync client over HTTP, against a baseline in the same process: the same number of
 * readings sent as one hand-made push with fetch (no outbox, no batching, no bookkeeping).
 *
 * The device store is SQLite (sql.js, the same engine family as expo-sqlite's web build).
 */
import { randomBytes, randomUUID } from 'node:crypto';
import { performance } from 'node:perf_hooks';
import { Client } from 'pg';

const N = Number(process.env.SYNC_BENCH_READINGS ?? 1000);

export async function run(): Promise<void> {
  // @ts-expect-error plain .mjs module without types
  const { startCluster } = await import('../scripts/pg.mjs');
  const pg = await startCluster({ test: true });
  const name = `tr_bench_${randomBytes(4).toString('hex')}`;
  const admin = new Client({ connectionString: pg.adminUrl });
  await admin.connect();
  await admin.query(`create database ${name}`);
  const url = pg.adminUrl.replace(/\/[^/]+$/, `/${name}`);

  const { makeDataSource } = await import('../server/db');
  const { seedDemo } = await import('../server/seed/demo');
  const { loadConfig } = await import('../server/config');
  const { start } = await import('../server/main');
  const ds = makeDataSource(url);
  await ds.initialize();
  await ds.runMigrations();
  await seedDemo(ds);
  await ds.destroy();
  const server = await start(
    loadConfig({
      NODE_ENV: 'production',
      PORT: '0',
      DATABASE_URL: url,
      JWT_SECRET: randomBytes(32).toString('hex'),
      LOG_LEVEL: 'warn',
      PHOTO_DIR: `/tmp/${name}-photos`,
    }),
  );
  process.env.EXPO_PUBLIC_API_URL = server.url;

  try {
    const { rawRequest, authedRequest } = await import('../lib/api-client');
    const { openStore } = await import('../offline/store');
    const { createActions } = await import('../offline/actions');
    const { createSyncClient } = await import('../offline/sync');
    const { createHttpTransport } = await import('../offline/http-transport');
    const { openSqlJsDb } = await import('../tests/unit/offline/sqljs-db');
    const { createHash } = await import('node:crypto');

    const signIn = await rawRequest<{
      accessToken: string;
      user: { memberships: { siteId: string; siteName: string }[] };
    }>('/api/auth/sign-in', {
      method: 'POST',
      json: { email: 'tech@fernhallow.example', password: 'trueround-demo' },
    });
    const siteId = signIn.user.memberships.find((m) => m.siteName === 'Fernhallow Works')!.siteId;
    const tokens = { getAccessToken: () => signIn.accessToken, refresh: async () => false };
    const request = <T>(path: string, init?: RequestInit & { json?: unknown }) => authedRequest<T>(tokens, path, init);

    const store = await openStore(await openSqlJsDb());
    const ids = { uuid: () => randomUUID() };
    const clock = { now: () => Date.now() };
    const sha256 = async (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
    const actions = createActions({ store, ids, clock, sha256 });
    const sync = createSyncClient({
      store,
      transport: createHttpTransport(() => request),
      ids,
      clock,
      siteId: () => siteId,
    });
    await sync.syncNow({ force: true }); // pull reference data

    const route = (await store.listRoutes(siteId)).find((r) => r.version.template.id === 'boiler-house')!;
    const specs = route.version.template.stops.flatMap((s) => s.readings);
    const round = await actions.startRound(route.version.id);
    const tRecord0 = performance.now();
    const last: Record<string, string> = {};
    for (let k = 0; k < N; k++) {
      const spec = specs[k % specs.length];
      const r = await actions.recordReading({
        roundId: round.id,
        instrumentTag: spec.tag,
        valueTyped: (spec.band.min + spec.band.max) / 2,
        unit: spec.unit,
        reference: spec.reference ?? null,
        supersedes: last[spec.tag] ?? null,
      });
      last[spec.tag] = r.id;
    }
    const tRecord = performance.now() - tRecord0;
    const t0 = performance.now();
    const result = await sync.syncNow({ force: true });
    const tSync = performance.now() - t0;
    const counts = await store.outboxCounts();

    // Baseline: one hand-made push of N readings for another round, straight to the endpoint.
    const byTag = Object.fromEntries((await store.listInstruments(route.unitId)).map((i) => [i.tag, i.id]));
    const baseRound = randomUUID();
    const now = new Date().toISOString();
    const body = {
      payloadVersion: 2,
      deviceId: randomUUID(),
      sentAt: now,
      rounds: [
        {
          id: baseRound,
          routeVersionId: route.version.id,
          startedAt: now,
          finishedAt: null,
          status: 'in-progress',
          dismissals: [],
        },
      ],
      readings: Array.from({ length: N }, (_, k) => {
        const spec = specs[k % specs.length];
        return {
          id: randomUUID(),
          roundId: baseRound,
          instrumentId: byTag[spec.tag],
          valueTyped: (spec.band.min + spec.band.max) / 2,
          unit: spec.unit,
          reference: spec.reference ?? null,
          deviceTime: now,
          note: null,
          skipReason: null,
          supersedes: null,
          confirmedAfterFlag: false,
          flags: [],
        };
      }),
      checkAnswers: [],
      photos: [],
    };
    const b0 = performance.now();
    const res = await fetch(`${server.url}/api/sync/push`, {
      method: 'POST',
      headers: { 'Content-Type': 'application/json', Authorization: `Bearer ${signIn.accessToken}` },
      body: JSON.stringify(body),
    });
    const tBase = performance.now() - b0;
    if (!res.ok) throw new Error(`baseline push refused: ${res.status} ${(await res.text()).slice(0, 300)}`);

    const db = new Client({ connectionString: url });
    await db.connect();
    const stored = Number(
      (await db.query('select count(*)::int as n from readings where round_id = $1', [round.id])).rows[0].n,
    );
    await db.end();

    console.log(
      `readings recorded on the device: ${N} (${(tRecord / N).toFixed(2)} ms each, record + outbox row in one SQLite transaction)`,
    );
    console.log(
      `outbox after sync: waiting ${counts.waiting}, sent ${counts.sent}, refused ${counts.refused}; rows stored on the server: ${stored}`,
    );
    console.log('| what | time (ms) | ratio |');
    console.log('| --- | ---: | ---: |');
    console.log(`| baseline: one hand-made push of ${N} readings | ${tBase.toFixed(0)} | 1.00 |`);
    console.log(
      `| sync client: outbox of ${N} readings → server (batches of 500) | ${tSync.toFixed(0)} | ${(tSync / tBase).toFixed(2)} |`,
    );
    if (!result.ok || stored !== N) throw new Error(`sync incomplete: ok=${result.ok}, stored ${stored} of ${N}`);
  } finally {
    await server.stop();
    await admin.query(`drop database if exists ${name} with (force)`);
    await admin.end();
  }
}
