/**
 * One work order with 1 000 findings, on the test PostgreSQL cluster (TR_TEST_ADMIN_URL, else the
 * project's test cluster on 127.0.0.1:54330 — `npm run db:start -- --test` starts it).
 *
 * The data: a fresh database with the demo plant (no history), then one order with N_ROUNDS
 * findings (demo/big-work-order.ts).
 *
 * Timed through HTTP on a loopback port (the real app, the planner's token), interleaved, RUNS each:
 *  - baseline: GET /api/health (one round trip to the database);
 *  - GET …/work-orders/:id — the page a planner opens: summary, newest rounds of evidence, history
 *    (target: p95 ≤ 300 ms at 1 000 findings, issue 17);
 *  - GET …/work-orders/:id/evidence?offset=500&limit=5 — a page of older rounds;
 *  - every round of evidence, 50 rounds a request (what the page sent at once before it was paged).
 */
import type { Server } from 'node:http';
import { admin, databaseUrl, pct, serveSignedIn } from './bench-db';
import { makeDataSource } from '../server/db';
import { seedDemo } from '../server/seed/demo';
import { loadBigWorkOrder } from '../demo/big-work-order';

const N_ROUNDS = Number(process.env.TR_BENCH_WORK_ORDER_FINDINGS || 1000);
const RUNS = 20;

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
    const { siteId, workOrderId } = await loadBigWorkOrder(ds, N_ROUNDS);
    const site = { id: siteId };
    const wo = { id: workOrderId };
    await ds.query(`ANALYZE`);
    const loadS = (performance.now() - t0) / 1000;

    const served = await serveSignedIn(ds, url, 'planner@fernhallow.example');
    server = served.server;
    const { base, token } = served;
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
