/**
 * One work order with 1 000 findings, on the test PostgreSQL cluster (TR_TEST_ADMIN_URL, else the
 * project's test cluster on 127.0.0.1:54330 — `npm run db:start -- --test` starts it).
 *
 * The data: a fresh database with the demo plant (no history), then N_ROUNDS invented analysed
 * rounds loaded straight in SQL, three shifts a day, each with a TI-301 reading 0.5 K high (the demo
 * drift) with its analysis row (reading, σ, reconciled value, z) and one finding naming TI-301; all
 * findings attached to one open calibrate order, with one history event per round, as the analysis
 * writes them when it attaches evidence (server/work-orders/from-findings.ts).
 *
 * Timed through HTTP on a loopback port (the real app, the planner's token), interleaved, RUNS each:
 *  - baseline: GET /api/health (one round trip to the database);
 *  - GET …/work-orders/:id — the page a planner opens: summary, newest rounds of evidence, history
 *    (target: p95 ≤ 300 ms at 1 000 findings, issue 17);
 *  - GET …/work-orders/:id/evidence?offset=500&limit=5 — a page of older rounds;
 *  - every round of evidence, 50 rounds a request (what the page sent at once before it was paged).
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { admin, databaseUrl, pct } from './bench-db';
import { createApp } from '../server/app';
import { loadConfig } from '../server/config';
import { makeDataSource } from '../server/db';
import { makeLogger } from '../server/logger';
import { seedDemo } from '../server/seed/demo';
import { DEMO_PASSWORD } from '../server/seed/demo-users';
import { barometricFromElevation } from '../shared/units';

const N_ROUNDS = Number(process.env.TR_BENCH_WORK_ORDER_FINDINGS || 1000);
const RUNS = 20;
const BARO = barometricFromElevation(112);
/** TI-301 around its design value, 0.5 K high, σ 0.25 K (Pt100 class A, the demo's), reconciled σ 0.1 K */
const T_DESIGN = 415.15;

export async function run(): Promise<void> {
  const name = `tr_bench_work_order_${Date.now()}`;
  await admin(`create database "${name}"`);
  const url = databaseUrl(name);
  const ds = makeDataSource(url, { poolSize: 6, applicationName: 'trueround-bench' });
  let server: Server | undefined;
  try {
    await ds.initialize();
    await ds.runMigrations();
    await seedDemo(ds, { history: false });
    const t0 = performance.now();
    const [site] = (await ds.query(`SELECT "id" FROM "sites" WHERE "slug" = 'fernhallow'`)) as { id: string }[];
    const [unit] = (await ds.query(`SELECT "id" FROM "units" WHERE "site_id" = $1`, [site.id])) as { id: string }[];
    const [inst] = (await ds.query(`SELECT "id" FROM "instruments" WHERE "unit_id" = $1 AND "tag" = 'TI-301'`, [
      unit.id,
    ])) as { id: string }[];
    const [tech] = (await ds.query(`SELECT "id" FROM "users" WHERE "email" = 'tech@fernhallow.example'`)) as {
      id: string;
    }[];
    const [version] = (await ds.query(
      `SELECT v."id" FROM "route_versions" v JOIN "routes" r ON r."id" = v."route_id" WHERE r."unit_id" = $1 ORDER BY r."key" LIMIT 1`,
      [unit.id],
    )) as { id: string }[];
    await ds.query(
      `INSERT INTO "rounds" ("id", "site_id", "route_version_id", "technician_id", "started_at_device", "finished_at_device", "received_at", "status",
                             "client_clock_skew_ms", "device_id", "analysed_at")
       SELECT gen_random_uuid(), $1, $2, $3, t, t + interval '40 minutes', t + interval '45 minutes', 'finished', 0, 'bench', t + interval '46 minutes'
         FROM generate_series(1, $4::int) k, LATERAL (SELECT now() - (k * interval '8 hours') AS t) x`,
      [site.id, version.id, tech.id, N_ROUNDS],
    );
    await ds.query(
      `INSERT INTO "analyses" ("round_id", "site_id", "unit_id", "input_hash", "model_version", "barometric_pa", "barometric_source",
                               "state_points", "balances", "performance", "instruments", "reconciliation", "finding_count", "analysed_at")
       SELECT ro."id", ro."site_id", $2, md5(ro."id"::text), 'bench', $3, 'elevation', '[]', '[]', '[]', '[]',
              '{"ok":true,"chiSquare":31.2,"dof":14,"critical":23.7,"passed":false,"zCritical":3.2,"suspects":["TI-301"]}', 1, ro."analysed_at"
         FROM "rounds" ro WHERE ro."site_id" = $1`,
      [site.id, unit.id, BARO],
    );
    await ds.query(
      `INSERT INTO "readings" ("id", "round_id", "instrument_id", "value_typed", "unit", "value_si", "device_time", "received_at")
       SELECT gen_random_uuid(), ro."id", $2, 142.5, '°C', $3 + 0.5, ro."started_at_device" + interval '5 minutes', ro."received_at"
         FROM "rounds" ro WHERE ro."site_id" = $1`,
      [site.id, inst.id, T_DESIGN],
    );
    await ds.query(
      `INSERT INTO "analysis_instruments" ("analysis_id", "instrument_id", "round_id", "site_id", "reading_id", "measured_at", "status", "reading_si",
                                           "sigma_si", "reconciled_si", "reconciled_sigma_si", "estimate_si", "estimate_sigma_si", "z", "suspect", "redundant")
       SELECT a."id", x."instrument_id", x."round_id", a."site_id", x."id", x."device_time", 'used', x."value_si", 0.25, $1 + 0.02, 0.1, $1, 0.12,
              (($1 + 0.02) - x."value_si") / sqrt(0.25 ^ 2 - 0.1 ^ 2), true, true
         FROM "readings" x JOIN "analyses" a ON a."round_id" = x."round_id"`,
      [T_DESIGN],
    );
    await ds.query(
      `INSERT INTO "findings" ("analysis_id", "round_id", "site_id", "unit_id", "ordinal", "kind", "severity", "instrument_tags", "instrument_ids", "message", "evidence", "created_at")
       SELECT a."id", a."round_id", a."site_id", a."unit_id", 0, 'sustained-bias', 2, '["TI-301"]', ARRAY[$1::uuid],
              'TI-301 reads about 0.5 K high against the balances', '{"u":2.1}', a."analysed_at"
         FROM "analyses" a WHERE a."site_id" = $2`,
      [inst.id, site.id],
    );
    const [wo] = (await ds.query(
      `INSERT INTO "work_orders" ("site_id", "unit_id", "number", "code", "kind", "status", "priority", "title", "instrument_id", "instrument_tag", "due_date")
       VALUES ($1, $2, 1, 'WO-0001', 'calibrate', 'open', 2, 'Calibrate TI-301 (deaerator outlet temperature): sustained bias', $3, 'TI-301', (now() + interval '14 days')::date)
       RETURNING "id"`,
      [site.id, unit.id, inst.id],
    )) as { id: string }[];
    await ds.query(
      `INSERT INTO "work_order_findings" ("work_order_id", "finding_id", "attached_at") SELECT $1, f."id", f."created_at" FROM "findings" f WHERE f."site_id" = $2`,
      [wo.id, site.id],
    );
    await ds.query(
      `INSERT INTO "work_order_events" ("work_order_id", "actor_id", "type", "changes", "comment", "at")
       SELECT $1, NULL, 'evidence', jsonb_build_object('roundId', f."round_id"), f."message", f."created_at" FROM "findings" f WHERE f."site_id" = $2`,
      [wo.id, site.id],
    );
    await ds.query(`ANALYZE`);
    const loadS = (performance.now() - t0) / 1000;

    const config = loadConfig({
      NODE_ENV: 'test',
      DATABASE_URL: url,
      JWT_SECRET: 'bench-secret-of-the-work-order-bench-0123456789',
      LOG_LEVEL: 'silent',
      PORT: '0',
      SIGN_IN_RATE_LIMIT: '1000',
    });
    const app = createApp({ config, dataSource: ds, logger: makeLogger(config) });
    server = await new Promise<Server>((resolve) => {
      const s = app.listen(0, '127.0.0.1', () => resolve(s));
    });
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const signIn = await fetch(`${base}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'planner@fernhallow.example', password: DEMO_PASSWORD }),
    });
    if (!signIn.ok) throw new Error(`sign-in: ${signIn.status} ${await signIn.text()}`);
    const token = ((await signIn.json()) as { accessToken: string }).accessToken;
    const get = async (path: string) => {
      const res = await fetch(`${base}${path}`, { headers: { authorization: `Bearer ${token}` } });
      const body = await res.text();
      if (!res.ok) throw new Error(`${path}: ${res.status} ${body.slice(0, 300)}`);
      return body;
    };
    const wop = `/api/sites/${site.id}/work-orders/${wo.id}`;
    const cases: { label: string; paths: string[] }[] = [
      { label: 'GET /api/health (baseline)', paths: ['/api/health'] },
      { label: 'the order’s page (summary + newest 5 rounds + history)', paths: [wop] },
      { label: 'older rounds 501–505', paths: [`${wop}/evidence?offset=500&limit=5`] },
      {
        label: `every round of evidence, 50 a request (${Math.ceil(N_ROUNDS / 50)} requests)`,
        paths: Array.from({ length: Math.ceil(N_ROUNDS / 50) }, (_, k) => `${wop}/evidence?offset=${k * 50}&limit=50`),
      },
    ];
    const first = JSON.parse(await get(wop)) as {
      evidenceSummary: { findingCount: number; roundCount: number; trend: unknown[] };
      evidence: unknown[];
      events: unknown[];
    };
    const bytes = (await get(wop)).length;
    for (const c of cases) for (const p of c.paths) await get(p); // warm up
    const times = cases.map(() => [] as number[]);
    for (let k = 0; k < RUNS; k++) {
      for (const [j, c] of cases.entries()) {
        const t = performance.now();
        for (const p of c.paths) await get(p);
        times[j].push(performance.now() - t);
      }
    }
    const base50 = pct(times[0], 50);
    console.log(
      `data: 1 order, ${first.evidenceSummary.findingCount} findings on ${first.evidenceSummary.roundCount} rounds, ` +
        `${first.events.length} history events; the page carries ${first.evidence.length} findings, ${first.evidenceSummary.trend.length} trend points, ` +
        `${(bytes / 1024).toFixed(0)} KiB; loaded in ${loadS.toFixed(1)} s`,
    );
    console.log(`| request | p50 ms | p95 ms | p50 / baseline |`);
    console.log(`| --- | ---: | ---: | ---: |`);
    cases.forEach((c, j) => {
      const p50 = pct(times[j], 50);
      console.log(
        `| ${c.label} | ${p50.toFixed(1)} | ${pct(times[j], 95).toFixed(1)} | ${(p50 / base50).toFixed(1)}× |`,
      );
    });
    const p95 = pct(times[1], 95);
    console.log(`target: the order's page p95 ≤ 300 ms — ${p95 <= 300 ? 'met' : 'NOT met'} (${p95.toFixed(1)} ms)`);
  } finally {
    await new Promise<void>((resolve) => (server ? server.close(() => resolve()) : resolve()));
    if (ds.isInitialized) await ds.destroy();
    await admin(`drop database if exists "${name}" with (force)`);
  }
}

if (require.main === module) {
  run().catch((e: unknown) => {
    console.error(e);
    process.exit(1);
  });
}
