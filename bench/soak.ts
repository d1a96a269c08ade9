/**
 * Soak: the real server (child process on loopback, so its RSS is the server's alone) under a
 * steady mixed load for TR_SOAK_SECONDS (default 60) — pushes from 50 simulated technicians (each
 * its own account, device and rounds with unique ids, 41 readings of the Fernhallow turbine-hall
 * route at its design point, shared/cycle demoDesignReadings), work-order list reads by planners
 * and instrument history reads by engineers — driven by autocannon.
 *
 * Database: TR_SOAK_DB_URL (migrated and seeded if empty), else a fresh `tr_soak_*` database on
 * the test cluster (scripts/pg.mjs, :54330), dropped afterwards. Analysis workers are off in the
 * server under test (WORKERS_IN_PROCESS=false): the soak measures the API; jobs stay queued.
 *
 * Prints requests/s, p50/p99 latency and errors per kind, readings stored vs pushed (duplicates
 * and losses), server RSS idle and every 10 s under load. Exits 1 on any error, duplicate or
 * loss, or when the median RSS of the run's second half exceeds that of its first half by 10 %.
 */
import { spawn } from 'node:child_process';
import { randomBytes, randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { join } from 'node:path';
import { Client } from 'pg';
import { demoDesignReadings, demoUnit } from '../demo/unit';
import { barometricFromElevation, fromSI, type Unit } from '../shared/units';
import { DEMO_PASSWORD, demoUser } from '../server/seed/demo-users';

/** What the soak uses of autocannon 8 (the package ships no types): its README's options and result. */
interface AcRequest {
  method?: string;
  path?: string;
  headers?: Record<string, string>;
  body?: string;
  setupRequest?: (req: AcRequest, context: object) => AcRequest;
  onResponse?: (status: number, body: string, context: object) => void;
}
interface AcOptions {
  url: string;
  duration?: number;
  timeout?: number;
  connections?: number;
  headers?: Record<string, string>;
  requests?: AcRequest[];
}
interface AcResult {
  errors: number;
  timeouts: number;
  non2xx: number;
  requests: { total: number; average: number };
  latency: { p50: number; p99: number };
}
const autocannon = require('autocannon') as (o: AcOptions) => Promise<AcResult>;

const SECONDS = Number(process.env.TR_SOAK_SECONDS ?? 60);
const TECHS = 50;
const ROOT = join(__dirname, '..');

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

const rssKb = (pid: number) => Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1] ?? NaN);

async function provision(): Promise<{ url: string; drop: () => Promise<void> }> {
  const { makeDataSource } = await import('../server/db');
  const { seedDemo } = await import('../server/seed/demo');
  const prepare = async (url: string) => {
    const ds = makeDataSource(url, { poolSize: 2 });
    await ds.initialize();
    await ds.runMigrations();
    const [{ n }] = (await ds.query(`SELECT count(*)::int AS n FROM sites`)) as { n: number }[];
    if (n === 0) await seedDemo(ds);
    await ds.destroy();
  };
  if (process.env.TR_SOAK_DB_URL) {
    await prepare(process.env.TR_SOAK_DB_URL);
    return { url: process.env.TR_SOAK_DB_URL, drop: async () => undefined };
  }
  // @ts-expect-error plain .mjs module without types
  const { startCluster } = await import('../scripts/pg.mjs');
  const pg = (await startCluster({ test: true })) as { adminUrl: string };
  const name = `tr_soak_${Math.floor(Date.now() / 1000)}_${randomBytes(3).toString('hex')}`;
  const admin = new Client({ connectionString: pg.adminUrl });
  await admin.connect();
  await admin.query(`create database ${name}`);
  await admin.end();
  const url = pg.adminUrl.replace(/\/[^/]+$/, `/${name}`);
  await prepare(url);
  return {
    url,
    drop: async () => {
      const a = new Client({ connectionString: pg.adminUrl });
      await a.connect();
      await a.query(`drop database if exists ${name} with (force)`);
      await a.end();
    },
  };
}

interface Kind {
  name: string;
  result?: AcResult;
}

async function main(): Promise<void> {
  const db = await provision();
  const q = new Client({ connectionString: db.url });
  await q.connect();
  let child: ReturnType<typeof spawn> | null = null;
  try {
    // 50 technician accounts on Fernhallow (the demo technician's password hash, so the demo password signs them in)
    await q.query(
      `INSERT INTO users (email, name, password_hash)
       SELECT 'soak-tech-' || g || '@fernhallow.example', 'Soak technician ' || g, u.password_hash
         FROM users u, generate_series(1, ${TECHS}) g WHERE u.email = 'tech@fernhallow.example'
       ON CONFLICT DO NOTHING`,
    );
    await q.query(
      `INSERT INTO memberships (user_id, site_id, role)
       SELECT u.id, s.id, 'technician' FROM users u, sites s
        WHERE u.email LIKE 'soak-tech-%@fernhallow.example' AND s.slug = 'fernhallow'
          AND NOT EXISTS (SELECT 1 FROM memberships m WHERE m.user_id = u.id AND m.site_id = s.id)`,
    );
    const [site] = (await q.query(`SELECT id, elevation_m FROM sites WHERE slug = 'fernhallow'`)).rows as {
      id: string;
      elevation_m: number;
    }[];
    const [route] = (await q.query(`SELECT current_version_id FROM routes WHERE key = 'turbine-hall'`)).rows as {
      current_version_id: string;
    }[];
    const inst = new Map<string, string>();
    for (const r of (
      await q.query(`SELECT i.tag, i.id FROM instruments i JOIN units u ON u.id = i.unit_id WHERE u.site_id = $1`, [
        site.id,
      ])
    ).rows as {
      tag: string;
      id: string;
    }[]) {
      inst.set(r.tag, r.id);
    }
    const historyTags = ['TI-301', 'PI-101', 'FI-101', 'TI-101'].filter((t) => inst.has(t));

    const port = await freePort();
    const out: string[] = [];
    // SIGUSR2 makes the server run a full GC and print its heap (a plateau after GC tells warm-up from a leak)
    const probe = `process.on('SIGUSR2', () => { globalThis.gc(); const m = process.memoryUsage(); console.log('SOAK-HEAP ' + m.heapUsed + ' ' + m.rss); })`;
    child = spawn(
      process.execPath,
      [
        '--expose-gc',
        '--import',
        `data:text/javascript,${encodeURIComponent(probe)}`,
        '--import',
        'tsx',
        join(ROOT, 'server/main.ts'),
      ],
      {
        cwd: ROOT,
        env: {
          ...process.env,
          NODE_ENV: 'production',
          HOST: '127.0.0.1',
          PORT: String(port),
          DATABASE_URL: db.url,
          JWT_SECRET: randomBytes(32).toString('hex'),
          ACCESS_TOKEN_TTL_S: '3600',
          LOG_LEVEL: 'warn',
          WORKERS_IN_PROCESS: 'false',
          ANALYSIS_SWEEP_INTERVAL_S: '0',
          PHOTO_DIR: `/tmp/tr-soak-photos-${port}`,
        },
        stdio: ['ignore', 'pipe', 'pipe'],
      },
    );
    child.stdout!.on('data', (b: Buffer) => out.push(String(b)));
    child.stderr!.on('data', (b: Buffer) => out.push(String(b)));
    const t0 = Date.now();
    while (!out.join('').includes('Trueround listening on')) {
      if (child.exitCode !== null || Date.now() - t0 > 60_000) throw new Error(`server did not start: ${out.join('')}`);
      await new Promise((r) => setTimeout(r, 50));
    }
    const base = `http://127.0.0.1:${port}`;
    const signIn = async (email: string) => {
      const res = await fetch(`${base}/api/auth/sign-in`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email, password: DEMO_PASSWORD }),
      });
      if (res.status !== 200) throw new Error(`sign-in ${email}: ${res.status} ${await res.text()}`);
      return ((await res.json()) as { accessToken: string }).accessToken;
    };
    const techTokens: string[] = [];
    for (let i = 1; i <= TECHS; i++) techTokens.push(await signIn(`soak-tech-${i}@fernhallow.example`));
    const plannerToken = await signIn(demoUser('planner', 'fernhallow').email);
    const engineerToken = await signIn(demoUser('engineer', 'fernhallow').email);

    // a round's readings as the gauges show them at design, with a little deterministic noise
    const baro = barometricFromElevation(site.elevation_m);
    const design = demoDesignReadings(baro);
    let seq = 0;
    const pushedReadings: string[] = [];
    const pushedRounds: string[] = [];
    const roundBody = (tech: number) => {
      const roundId = randomUUID();
      const t = new Date().toISOString();
      const k = seq++;
      const readings = design.map((r, j) => {
        const i = demoUnit.instruments.find((x) => x.tag === r.instrumentTag)!;
        const wiggle = 1 + 1e-4 * Math.sin(k * 7.1 + j * 3.3);
        const value = fromSI(i.quantity, r.valueSI * wiggle, r.shown.unit as Unit, r.shown.reference, {
          barometricPa: baro,
        });
        return {
          id: randomUUID(),
          roundId,
          instrumentId: inst.get(r.instrumentTag)!,
          valueTyped: Number(value.toPrecision(6)),
          unit: r.shown.unit,
          reference: r.shown.reference ?? null,
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
        readingIds: readings.map((r) => r.id),
        body: JSON.stringify({
          payloadVersion: 2,
          deviceId: `soak-phone-${tech}`,
          sentAt: t,
          rounds: [
            {
              id: roundId,
              routeVersionId: route.current_version_id,
              startedAt: t,
              finishedAt: t,
              status: 'finished',
              dismissals: [],
            },
          ],
          readings,
          checkAnswers: [],
          photos: [],
        }),
      };
    };

    // warm-up: one request of each kind, then the baseline RSS
    const warm = roundBody(0);
    await fetch(`${base}/api/sync/push`, {
      method: 'POST',
      headers: { authorization: `Bearer ${techTokens[0]}`, 'content-type': 'application/json' },
      body: warm.body,
    });
    pushedRounds.push(warm.roundId);
    pushedReadings.push(...warm.readingIds);
    await fetch(`${base}/api/sites/${site.id}/work-orders`, { headers: { authorization: `Bearer ${plannerToken}` } });
    await fetch(`${base}/api/sites/${site.id}/instruments/${historyTags[0]}/history`, {
      headers: { authorization: `Bearer ${engineerToken}` },
    });
    await new Promise((r) => setTimeout(r, 500));
    const rssBefore = rssKb(child.pid!);
    const heapAfterGc = async (): Promise<{ heap: number; rss: number }> => {
      const seen = out.length;
      child!.kill('SIGUSR2');
      for (let i = 0; i < 100; i++) {
        const m = /SOAK-HEAP (\d+) (\d+)/.exec(out.slice(seen).join(''));
        if (m) return { heap: Number(m[1]), rss: Number(m[2]) };
        await new Promise((r) => setTimeout(r, 50));
      }
      throw new Error('the server did not report its heap');
    };
    const gcBefore = await heapAfterGc();

    let nextTech = 0;
    const inFlight = new Map<object, { roundId: string; readingIds: string[] }>();
    const pushes: Kind = { name: 'push (41 readings)' };
    const lists: Kind = { name: 'work-order list' };
    const history: Kind = { name: 'instrument history' };
    const run = (o: Omit<AcOptions, 'url'>) => autocannon({ duration: SECONDS, timeout: 30, ...o, url: base });

    // RSS every 10 s of the run: a plateau is the heap sizing itself to the load, a steady climb a leak
    const samples: number[] = [];
    const sampler = setInterval(() => samples.push(rssKb(child!.pid!)), 10_000);
    let historyIx = 0;
    const [rp, rl, rh] = await Promise.all([
      run({
        connections: TECHS,
        requests: [
          {
            method: 'POST',
            path: '/api/sync/push',
            setupRequest: (req, context) => {
              const c = context as { tech?: number };
              if (c.tech === undefined) c.tech = nextTech++ % TECHS;
              const r = roundBody(c.tech);
              inFlight.set(context, { roundId: r.roundId, readingIds: r.readingIds });
              return {
                ...req,
                headers: {
                  ...req.headers,
                  authorization: `Bearer ${techTokens[c.tech]}`,
                  'content-type': 'application/json',
                },
                body: r.body,
              };
            },
            onResponse: (status, _body, context) => {
              const r = inFlight.get(context);
              if (r && status === 200) {
                pushedRounds.push(r.roundId);
                pushedReadings.push(...r.readingIds);
              }
            },
          },
        ],
      }),
      run({
        connections: 5,
        headers: { authorization: `Bearer ${plannerToken}` },
        requests: [{ method: 'GET', path: `/api/sites/${site.id}/work-orders` }],
      }),
      run({
        connections: 5,
        headers: { authorization: `Bearer ${engineerToken}` },
        requests: [
          {
            method: 'GET',
            setupRequest: (req) => ({
              ...req,
              path: `/api/sites/${site.id}/instruments/${historyTags[historyIx++ % historyTags.length]}/history`,
            }),
          },
        ],
      }),
    ]);
    clearInterval(sampler);
    pushes.result = rp;
    lists.result = rl;
    history.result = rh;
    await new Promise((r) => setTimeout(r, 500));
    const rssAfter = rssKb(child.pid!);
    const gcAfter = await heapAfterGc();

    // what the database holds of what was pushed
    const [{ stored, distinct }] = (
      await q.query(
        `SELECT count(*)::int AS stored, count(DISTINCT id)::int AS distinct FROM readings WHERE round_id = ANY($1::uuid[])`,
        [pushedRounds],
      )
    ).rows as { stored: number; distinct: number }[];
    const [{ rounds }] = (
      await q.query(`SELECT count(*)::int AS rounds FROM rounds WHERE id = ANY($1::uuid[])`, [pushedRounds])
    ).rows as { rounds: number }[];
    const pushedSet = new Set(pushedReadings);
    const duplicates = stored - distinct + Math.max(0, distinct - pushedSet.size);
    const lost = Math.max(0, pushedSet.size - distinct);

    const rows = [pushes, lists, history].map((k) => {
      const r = k.result!;
      const errors = r.errors + r.timeouts + r.non2xx;
      return {
        kind: k.name,
        requests: r.requests.total,
        rps: r.requests.average,
        p50: r.latency.p50,
        p99: r.latency.p99,
        errors,
      };
    });
    const pad = (s: string | number, n: number) => String(s).padStart(n);
    console.log(
      `\nSoak: ${SECONDS} s, ${TECHS} technicians pushing, 5 planners listing work orders, 5 engineers reading instrument history (server pid ${child.pid})\n`,
    );
    console.log(
      `${'kind'.padEnd(22)}${pad('requests', 10)}${pad('req/s', 9)}${pad('p50 ms', 9)}${pad('p99 ms', 9)}${pad('errors', 8)}`,
    );
    for (const r of rows)
      console.log(
        `${r.kind.padEnd(22)}${pad(r.requests, 10)}${pad(r.rps.toFixed(1), 9)}${pad(r.p50, 9)}${pad(r.p99, 9)}${pad(r.errors, 8)}`,
      );
    const totalErrors = rows.reduce((s, r) => s + r.errors, 0);
    console.log(
      `\nrounds pushed (200) ${pushedRounds.length}, stored ${rounds}; readings pushed ${pushedSet.size}, stored ${stored} (distinct ids ${distinct})`,
    );
    console.log(`duplicates ${duplicates}, lost ${lost}, errors ${totalErrors}`);
    // Growth is the median RSS of the second half of the run against that of the first half
    // (samples every 10 s under load). From idle every server "grows" while its heap sizes itself
    // to the load, and a single sample swings by ±10 % with GC and allocator timing; a leak shows
    // as the level climbing from one half to the other.
    const median = (xs: number[]) => {
      const s = [...xs].sort((a, b) => a - b);
      return s.length === 0
        ? Number.NaN
        : s.length % 2
          ? s[(s.length - 1) / 2]
          : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
    };
    const half = Math.max(1, Math.floor(samples.length / 2));
    const firstHalf = median(samples.slice(0, half).length ? samples.slice(0, half) : [rssBefore]);
    const secondHalf = median(samples.slice(half).length ? samples.slice(half) : [rssAfter]);
    const growth = (secondHalf - firstHalf) / firstHalf;
    console.log(
      `server RSS idle ${(rssBefore / 1024).toFixed(1)} MiB; under load, median of the first half ${(firstHalf / 1024).toFixed(1)} MiB, of the second half ` +
        `${(secondHalf / 1024).toFixed(1)} MiB (${growth >= 0 ? '+' : ''}${(growth * 100).toFixed(1)} %)${growth > 0.1 ? '  ✗ growth over 10 %' : ''}; at the end ${(rssAfter / 1024).toFixed(1)} MiB`,
    );
    console.log(`server RSS every 10 s, MiB: ${samples.map((k) => (k / 1024).toFixed(0)).join(', ')}`);
    const mib = (b: number) => (b / 1048576).toFixed(1);
    const heapGrowth = (gcAfter.heap - gcBefore.heap) / gcBefore.heap;
    console.log(
      `server heap after a full GC: before ${mib(gcBefore.heap)} MiB, after ${mib(gcAfter.heap)} MiB (${heapGrowth >= 0 ? '+' : ''}${(heapGrowth * 100).toFixed(1)} %); RSS then ${mib(gcAfter.rss)} MiB`,
    );
    if (child.exitCode !== null) throw new Error(`server exited during the soak: ${out.join('').slice(-2000)}`);
    if (totalErrors > 0 || duplicates > 0 || lost > 0 || rounds !== pushedRounds.length || growth > 0.1)
      process.exitCode = 1;
  } finally {
    child?.kill('SIGTERM');
    await q.end();
    await db.drop();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exitCode = 1;
});
