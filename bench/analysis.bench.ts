/**
 * Push to analysed-and-stored, end to end on the test PostgreSQL cluster (TR_TEST_ADMIN_URL, else
 * the project's test cluster on 127.0.0.1:54330 — `npm run db:start -- --test` starts it).
 *
 * A fresh database (migrated, demo seed, 20 extra technicians), the real app on a loopback port
 * with the analysis queue (pg-boss) and ANALYSIS_CONCURRENCY in-process workers. A round is the
 * Fernhallow demo unit's design point with ±0.2σ noise on every reading and TI-102A 10σ high (so
 * every analysis has findings and attaches them to the one open work order): 42 readings.
 *
 *  1. baseline, same process: analyseRound() alone on such a round (median of interleaved runs),
 *     and runAnalysisJob() alone (load + analyse + store, no HTTP, no queue);
 *  2. 50 rounds one after the other: POST /api/sync/push → the notifier hears findingsStored;
 *  3. 20 technicians pushing one round each at the same moment: no error, one analysis per round,
 *     still one open work order for TI-102A.
 * p50/p95 of each and the ratios to the analyseRound baseline.
 */
import { randomUUID } from 'node:crypto';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { ADMIN_URL, admin, databaseUrl, pct } from './bench-db';
import { createApp } from '../server/app';
import { runAnalysisJob } from '../server/analysis/job';
import { startAnalysisRuntime } from '../server/analysis/queue';
import { hashPassword } from '../server/auth/passwords';
import { loadConfig } from '../server/config';
import { makeDataSource } from '../server/db';
import { makeLogger } from '../server/logger';
import type { Notifier } from '../server/notify';
import { seedDemo } from '../server/seed/demo';
import { DEMO_PASSWORD } from '../server/seed/demo-users';
import { analyseRound, type RoundReading } from '../shared/cycle';
import { demoDesignReadings, demoUnit } from '../demo/unit';
import { mulberry32 } from '../shared/random';
import { barometricFromElevation, fromSI, type Unit } from '../shared/units';

const BARO = barometricFromElevation(112);
const SEQUENTIAL = 50;
const CONCURRENT = 20;

const ms = (x: number) => x.toFixed(1);

/** reproducible noise in [0, 1) */
const rnd = mulberry32(7);

const design = analyseRound(demoUnit, demoDesignReadings(BARO), { barometricPa: BARO });
const sigma = new Map(design.instruments.map((i) => [i.tag, i.sigma ?? 0]));

/** SI readings of one round: design ± 0.2σ, TI-102A + 10σ */
function roundReadings(): RoundReading[] {
  return demoDesignReadings(BARO).map((r) => {
    const s = sigma.get(r.instrumentTag)!;
    return {
      instrumentTag: r.instrumentTag,
      valueSI: r.valueSI + (r.instrumentTag === 'TI-102A' ? 10 * s : 0) + 0.2 * (2 * rnd() - 1) * s,
    };
  });
}

function body(versionId: string, inst: Map<string, string>) {
  const roundId = randomUUID();
  const t = new Date().toISOString();
  const readings = roundReadings().map((r) => {
    const i = demoUnit.instruments.find((x) => x.tag === r.instrumentTag)!;
    return {
      id: randomUUID(),
      roundId,
      instrumentId: inst.get(i.tag)!,
      valueTyped: fromSI(i.quantity, r.valueSI, i.unit as Unit, i.pressureReference, { barometricPa: BARO }),
      unit: i.unit,
      reference: i.pressureReference ?? null,
      deviceTime: t,
      note: null,
      skipReason: null,
      supersedes: null,
      confirmedAfterFlag: false,
      flags: [],
    };
  });
  return {
    roundId,
    json: JSON.stringify({
      payloadVersion: 2,
      deviceId: 'bench-phone',
      sentAt: t,
      rounds: [
        { id: roundId, routeVersionId: versionId, startedAt: t, finishedAt: t, status: 'finished', dismissals: [] },
      ],
      readings,
      checkAnswers: [],
      photos: [],
    }),
  };
}

function median(f: () => unknown, reps: number): number {
  for (let i = 0; i < 5; i++) f();
  const xs: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    f();
    xs.push(performance.now() - t0);
  }
  return pct(xs, 50);
}

export async function run(): Promise<void> {
  try {
    await admin('select 1');
  } catch (e) {
    console.log(
      `analysis bench skipped: no PostgreSQL at ${ADMIN_URL} (${e instanceof Error ? e.message : String(e)}); start it with npm run db:start -- --test`,
    );
    return;
  }
  const name = `tr_bench_${Date.now()}`;
  await admin(`create database "${name}"`);
  const url = databaseUrl(name);
  const ds = makeDataSource(url, { poolSize: 12, applicationName: 'trueround-bench' });
  let server: Server | undefined;
  let stopRuntime: (() => Promise<void>) | undefined;
  try {
    await ds.initialize();
    await ds.runMigrations();
    // sites, users and plant only: the demo history (server/seed/history.ts) would add rounds and work orders of its own
    await seedDemo(ds, { history: false });
    const [fern] = (await ds.query(`SELECT id FROM sites WHERE slug = 'fernhallow'`)) as { id: string }[];
    const hash = await hashPassword(DEMO_PASSWORD);
    const techs: string[] = [];
    for (let i = 1; i <= CONCURRENT; i++) {
      const email = `tech${i}@bench.example`;
      const [{ id }] = (await ds.query(
        `INSERT INTO users (email, name, password_hash) VALUES ($1, $2, $3) RETURNING id`,
        [email, `Bench tech ${i}`, hash],
      )) as {
        id: string;
      }[];
      await ds.query(`INSERT INTO memberships (user_id, site_id, role) VALUES ($1, $2, 'technician')`, [id, fern.id]);
      techs.push(email);
    }
    const [route] = (await ds.query(`SELECT current_version_id AS v FROM routes WHERE key = 'turbine-hall'`)) as {
      v: string;
    }[];
    const inst = new Map(
      (
        (await ds.query(`SELECT i.tag, i.id FROM instruments i JOIN units u ON u.id = i.unit_id WHERE u.site_id = $1`, [
          fern.id,
        ])) as { tag: string; id: string }[]
      ).map((r) => [r.tag, r.id]),
    );

    const config = loadConfig({
      NODE_ENV: 'test',
      DATABASE_URL: url,
      JWT_SECRET: 'bench-secret-of-the-analysis-bench-0123456789',
      LOG_LEVEL: 'silent',
      PORT: '0',
      ANALYSIS_SWEEP_INTERVAL_S: '0',
      SIGN_IN_RATE_LIMIT: '1000',
    });
    const logger = makeLogger(config);
    const stored = new Map<string, (t: number) => void>();
    const notifier: Notifier = {
      workOrderOpened: () => undefined,
      assigned: () => undefined,
      findingsStored: (roundId) => stored.get(roundId)?.(performance.now()),
    };
    const whenStored = (roundId: string) => new Promise<number>((resolve) => stored.set(roundId, resolve));
    const runtime = await startAnalysisRuntime({ config, dataSource: ds, logger, notify: notifier, work: true });
    stopRuntime = () => runtime.stop();
    let queueing = true;
    const app = createApp({
      config,
      dataSource: ds,
      logger,
      notifier,
      syncHooks: { onRoundsPushed: async (ids) => void (queueing ? await runtime.enqueue(ids) : undefined) },
    });
    server = await new Promise<Server>((resolve) => {
      const s = app.listen(0, '127.0.0.1', () => resolve(s));
    });
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const signIn = async (email: string) => {
      const r = await fetch(`${base}/api/auth/sign-in`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email, password: DEMO_PASSWORD }),
      });
      if (r.status !== 200) throw new Error(`sign-in ${email}: ${r.status}`);
      return ((await r.json()) as { accessToken: string }).accessToken;
    };
    const push = async (token: string, json: string) => {
      const r = await fetch(`${base}/api/sync/push`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
        body: json,
      });
      if (r.status !== 200) throw new Error(`push: ${r.status} ${await r.text()}`);
      await r.arrayBuffer();
    };
    const tech = await signIn('tech@fernhallow.example');

    // 1. baselines --------------------------------------------------------------------------
    const sample = roundReadings();
    const tAnalyse = median(() => analyseRound(demoUnit, sample, { barometricPa: BARO }), 60);
    queueing = false;
    const direct: number[] = [];
    for (let i = 0; i < 20; i++) {
      const b = body(route.v, inst);
      await push(tech, b.json);
      const t0 = performance.now();
      await runAnalysisJob({ dataSource: ds, logger }, b.roundId);
      direct.push(performance.now() - t0);
    }
    queueing = true;

    // 2. sequential -------------------------------------------------------------------------
    const seqTotal: number[] = [];
    const seqPush: number[] = [];
    for (let i = 0; i < SEQUENTIAL; i++) {
      const b = body(route.v, inst);
      const done = whenStored(b.roundId);
      const t0 = performance.now();
      await push(tech, b.json);
      seqPush.push(performance.now() - t0);
      seqTotal.push((await done) - t0);
    }

    // 3. 20 technicians at once -------------------------------------------------------------
    const tokens = await Promise.all(techs.map(signIn));
    const bodies = tokens.map(() => body(route.v, inst));
    const waits = bodies.map((b) => whenStored(b.roundId));
    const t0 = performance.now();
    const pushes = await Promise.allSettled(
      bodies.map((b, i) => push(tokens[i], b.json).then(() => performance.now() - t0)),
    );
    const errors = pushes.filter((p) => p.status === 'rejected').length;
    const concPush = pushes
      .filter((p): p is PromiseFulfilledResult<number> => p.status === 'fulfilled')
      .map((p) => p.value);
    const concTotal = (await Promise.all(waits)).map((t) => t - t0);
    const ids = bodies.map((b) => b.roundId);
    const [check] = (await ds.query(
      `SELECT (SELECT count(*) FROM analyses WHERE round_id = ANY($1::uuid[]))::int AS analyses,
              (SELECT count(DISTINCT round_id) FROM analyses WHERE round_id = ANY($1::uuid[]))::int AS rounds,
              (SELECT count(*) FROM work_orders WHERE status NOT IN ('done', 'cancelled'))::int AS open_orders,
              (SELECT count(*) FROM work_orders)::int AS orders`,
      [ids],
    )) as { analyses: number; rounds: number; open_orders: number; orders: number }[];

    const row = (what: string, xs: number[]) => ({
      what,
      n: xs.length,
      'p50 ms': ms(pct(xs, 50)),
      'p95 ms': ms(pct(xs, 95)),
      'p50 / analyseRound': (pct(xs, 50) / tAnalyse).toFixed(2),
      'p95 / analyseRound': (pct(xs, 95) / tAnalyse).toFixed(2),
    });
    console.log(
      `Round: ${sample.length} readings (Fernhallow demo unit, TI-102A 10σ high: 2 findings per analysis attached to one work order); ` +
        `${config.ANALYSIS_CONCURRENCY} in-process workers; baseline analyseRound() median ${ms(tAnalyse)} ms, same process`,
    );
    console.table([
      row('analyseRound() alone (baseline)', [tAnalyse]),
      row('runAnalysisJob() alone: load + analyse + store + work orders', direct),
      row(`push → analysed and stored, ${SEQUENTIAL} rounds one by one`, seqTotal),
      row('  of which the push request', seqPush),
      row(`${CONCURRENT} technicians at once: push request`, concPush),
      row(`${CONCURRENT} technicians at once: push → analysed and stored`, concTotal),
    ]);
    console.log(
      `${CONCURRENT} concurrent pushes: ${errors} errors; ${check.analyses} analyses for ${check.rounds} rounds (duplicates: ${check.analyses - check.rounds}); ` +
        `work orders: ${check.orders} (open ${check.open_orders}, expected 1: every round flags TI-102A)`,
    );
    if (errors || check.analyses !== CONCURRENT || check.orders !== 1)
      throw new Error('the concurrent run stored something twice or failed');
  } finally {
    if (server) await new Promise<void>((r) => server!.close(() => r()));
    await stopRuntime?.();
    if (ds.isInitialized) await ds.destroy();
    await admin(`drop database if exists "${name}" with (force)`);
  }
}
