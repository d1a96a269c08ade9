/**
 * Instrument history over a year of rounds, on the test PostgreSQL cluster (TR_TEST_ADMIN_URL,
 * else the project's test cluster on 127.0.0.1:54330 — `npm run db:start -- --test` starts it).
 *
 * The data: a fresh database with the demo plant (no history), then a year of invented analysed
 * rounds loaded straight in SQL, shaped as the analysis job stores them: the three Fernhallow
 * routes walked every shift (3 a day) for 365 days, every instrument on the route read, one
 * current analysis per round with its per-instrument rows (reading, σ, reconciled value, z). The
 * demo unit has 41 instruments, so one unit-year is ~45 000 readings; to reach the ~500 000 of
 * a large site the year is loaded for the demo unit and ten copies of it on the same site
 * (`Bench unit 1…10`, same tags, their own ids), all in the same tables.
 *
 * Timed, through HTTP on a loopback port (the real app, the engineer's token):
 *  - baseline: GET /api/health (one round trip to the database);
 *  - GET …/instruments/TI-301/history over the whole year (one point per shift: ~1 095 points);
 *  - the same over the default 90 days;
 *  - GET …/instruments (the health table: 30-day aggregates of every instrument of the site).
 * p50/p95 over RUNS interleaved runs, and the ratios to the baseline.
 */
import type { Server } from 'node:http';
import { admin, databaseUrl, pct, serveSignedIn } from './bench-db';
import { makeDataSource } from '../server/db';
import { seedDemo } from '../server/seed/demo';
import { analyseRound } from '../shared/cycle';
import { demoDesignReadings, demoUnit } from '../demo/unit';
import { barometricFromElevation } from '../shared/units';

const DAYS = Number(process.env.TR_BENCH_HISTORY_DAYS || 365);
const COPIES = Number(process.env.TR_BENCH_HISTORY_COPIES || 10);
const RUNS = 20;
const BARO = barometricFromElevation(112);

export async function run(): Promise<void> {
  const name = `tr_bench_history_${Date.now()}`;
  await admin(`create database "${name}"`);
  const url = databaseUrl(name);
  const ds = makeDataSource(url, { poolSize: 6, applicationName: 'trueround-bench' });
  let server: Server | undefined;
  try {
    await ds.initialize();
    await ds.runMigrations();
    await seedDemo(ds, { history: false });

    // design values and σ of every demo instrument (IF97 state points of the design point)
    const design = analyseRound(demoUnit, demoDesignReadings(BARO), { barometricPa: BARO });
    const tags = design.instruments.map((i) => i.tag);
    const valueOf = design.instruments.map((i) => i.reading ?? 0);
    const sigmaOf = design.instruments.map((i) => i.sigma ?? 1);

    const t0 = performance.now();
    const [site] = (await ds.query(`SELECT s."id" FROM "sites" s WHERE s."slug" = 'fernhallow'`)) as { id: string }[];
    const [unit] = (await ds.query(`SELECT "id" FROM "units" WHERE "site_id" = $1`, [site.id])) as { id: string }[];
    const [tech] = (await ds.query(`SELECT "id" FROM "users" WHERE "email" = 'tech@fernhallow.example'`)) as {
      id: string;
    }[];
    // the copies: unit, instruments, routes and their current versions
    await ds.query(
      `INSERT INTO "units" ("site_id", "name", "model", "model_version")
       SELECT u."site_id", 'Bench unit ' || k, u."model", u."model_version" FROM "units" u, generate_series(1, $2::int) k WHERE u."id" = $1`,
      [unit.id, COPIES],
    );
    await ds.query(
      `INSERT INTO "instruments" ("unit_id", "tag", "quantity", "gauge_unit", "status", "is_barometer", "row_version", "point_ref", "equipment_ref")
       SELECT c."id", i."tag", i."quantity", i."gauge_unit", i."status", i."is_barometer", 1, i."point_ref", i."equipment_ref"
         FROM "instruments" i JOIN "units" c ON c."name" LIKE 'Bench unit %' WHERE i."unit_id" = $1`,
      [unit.id],
    );
    await ds.query(
      `INSERT INTO "routes" ("site_id", "unit_id", "key", "name")
       SELECT r."site_id", c."id", r."key" || '-' || c."id", r."name" FROM "routes" r JOIN "units" c ON c."name" LIKE 'Bench unit %' WHERE r."unit_id" = $1`,
      [unit.id],
    );
    await ds.query(
      `INSERT INTO "route_versions" ("route_id", "number", "template", "published_at")
       SELECT c."id", 1, v."template", now() FROM "routes" c
         JOIN "routes" r ON r."unit_id" = $1 AND c."key" LIKE r."key" || '-%'
         JOIN "route_versions" v ON v."route_id" = r."id"`,
      [unit.id],
    );
    // a year of rounds: every route of every unit, three shifts a day, ending an hour ago
    await ds.query(
      `INSERT INTO "rounds" ("id", "site_id", "route_version_id", "technician_id", "started_at_device", "finished_at_device", "received_at", "status",
                             "client_clock_skew_ms", "device_id", "analysed_at")
       SELECT gen_random_uuid(), $1, v."id", $2, t, t + interval '40 minutes', t + interval '45 minutes', 'finished', 0, 'bench', t + interval '46 minutes'
         FROM "route_versions" v JOIN "routes" r ON r."id" = v."route_id"
        CROSS JOIN generate_series(now() - ($3::int * interval '1 day') - interval '1 hour', now() - interval '1 hour', interval '8 hours') t
        WHERE r."site_id" = $1`,
      [site.id, tech.id, DAYS],
    );
    await ds.query(
      `INSERT INTO "analyses" ("round_id", "site_id", "unit_id", "input_hash", "model_version", "barometric_pa", "barometric_source",
                               "state_points", "balances", "performance", "instruments", "reconciliation", "finding_count")
       SELECT ro."id", ro."site_id", r."unit_id", md5(ro."id"::text), 'bench', $1, 'elevation', '[]', '[]', '[]', '[]', '{"ok":true}', 0
         FROM "rounds" ro JOIN "route_versions" v ON v."id" = ro."route_version_id" JOIN "routes" r ON r."id" = v."route_id"`,
      [BARO],
    );
    // readings: the instruments each route reads (its template), design value ± ~0.3σ
    await ds.query(
      `CREATE TEMP TABLE "bench_design" AS SELECT * FROM unnest($1::text[], $2::float8[], $3::float8[]) AS d("tag", "value", "sigma")`,
      [tags, valueOf, sigmaOf],
    );
    await ds.query(
      `INSERT INTO "readings" ("id", "round_id", "instrument_id", "value_typed", "unit", "value_si", "device_time", "received_at")
       SELECT gen_random_uuid(), ro."id", i."id", 0, i."gauge_unit", d."value" + d."sigma" * 0.3 * (random() + random() + random() - 1.5) * 2,
              ro."started_at_device" + interval '5 minutes', ro."received_at"
         FROM "rounds" ro
         JOIN "route_versions" v ON v."id" = ro."route_version_id"
         JOIN "routes" r ON r."id" = v."route_id"
         CROSS JOIN LATERAL jsonb_array_elements(v."template" -> 'stops') s
         CROSS JOIN LATERAL jsonb_array_elements(s -> 'readings') rd
         JOIN "instruments" i ON i."unit_id" = r."unit_id" AND i."tag" = rd ->> 'tag'
         JOIN "bench_design" d ON d."tag" = i."tag"`,
    );
    await ds.query(
      `INSERT INTO "analysis_instruments" ("analysis_id", "instrument_id", "round_id", "site_id", "reading_id", "measured_at", "status", "reading_si",
                                           "sigma_si", "reconciled_si", "reconciled_sigma_si", "z", "redundant")
       SELECT a."id", x."instrument_id", x."round_id", a."site_id", x."id", x."device_time", 'used', x."value_si", d."sigma", d."value", d."sigma" * 0.5,
              (x."value_si" - d."value") / d."sigma", true
         FROM "readings" x JOIN "analyses" a ON a."round_id" = x."round_id" JOIN "instruments" i ON i."id" = x."instrument_id" JOIN "bench_design" d ON d."tag" = i."tag"`,
    );
    await ds.query(`ANALYZE`);
    const loadS = (performance.now() - t0) / 1000;
    const [counts] = (await ds.query(
      `SELECT (SELECT count(*) FROM "rounds")::int AS "rounds", (SELECT count(*) FROM "readings")::int AS "readings",
              (SELECT count(*) FROM "analysis_instruments")::int AS "rows", (SELECT count(*) FROM "instruments")::int AS "instruments"`,
    )) as { rounds: number; readings: number; rows: number; instruments: number }[];

    const served = await serveSignedIn(ds, url, 'engineer@fernhallow.example');
    server = served.server;
    const { base, token } = served;
    const get = async (path: string) => {
      const t = performance.now();
      const res = await fetch(`${base}${path}`, { headers: { authorization: `Bearer ${token}` } });
      const body = await res.text();
      if (!res.ok) throw new Error(`${path}: ${res.status} ${body.slice(0, 300)}`);
      return { ms: performance.now() - t, body };
    };
    const yearAgo = new Date(Date.now() - (DAYS + 1) * 86_400_000).toISOString().slice(0, 10);
    const cases: { label: string; path: string; size?: (b: string) => string }[] = [
      { label: 'GET /api/health (baseline)', path: '/api/health' },
      {
        label: `TI-301 history, ${DAYS} days`,
        path: `/api/sites/${site.id}/instruments/TI-301/history?unitId=${unit.id}&from=${yearAgo}`,
        size: (b) => `${(JSON.parse(b) as { points: unknown[] }).points.length} points`,
      },
      {
        label: 'TI-301 history, default 90 days',
        path: `/api/sites/${site.id}/instruments/TI-301/history?unitId=${unit.id}`,
        size: (b) => `${(JSON.parse(b) as { points: unknown[] }).points.length} points`,
      },
      {
        label: 'instrument health table (30 days)',
        path: `/api/sites/${site.id}/instruments`,
        size: (b) => `${(JSON.parse(b) as { instruments: unknown[] }).instruments.length} rows`,
      },
    ];
    for (const c of cases) await get(c.path); // warm up
    const times = cases.map(() => [] as number[]);
    const sizes: string[] = cases.map(() => '');
    for (let k = 0; k < RUNS; k++) {
      for (const [j, c] of cases.entries()) {
        const r = await get(c.path);
        times[j].push(r.ms);
        if (k === 0 && c.size) sizes[j] = c.size(r.body);
      }
    }
    const base50 = pct(times[0], 50);
    console.log(
      `data: ${counts.rounds} rounds, ${counts.readings} readings, ${counts.rows} per-instrument analysis rows, ${counts.instruments} instruments ` +
        `(${1 + COPIES} units × ${DAYS} days × 3 shifts × 3 routes); loaded in ${loadS.toFixed(1)} s`,
    );
    console.log(`| request | answer | p50 ms | p95 ms | p50 / baseline |`);
    console.log(`| --- | --- | ---: | ---: | ---: |`);
    cases.forEach((c, j) => {
      const p50 = pct(times[j], 50);
      console.log(
        `| ${c.label} | ${sizes[j] || '—'} | ${p50.toFixed(1)} | ${pct(times[j], 95).toFixed(1)} | ${(p50 / base50).toFixed(1)}× |`,
      );
    });
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
