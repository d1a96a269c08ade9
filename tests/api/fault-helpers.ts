/**
 * What the fault tests share: the real server as a child process (node with tsx as a loader, so a
 * SIGKILL hits the server itself, not a wrapper), free ports, sign-in over HTTP, demo rounds built
 * from the seeded database (analysis-helpers designRound: the Fernhallow design point,
 * shared/cycle demoDesignReadings, IAPWS-IF97), and counts of what the database holds.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { demoUser } from '../../server/seed/demo-users';
import { DEMO_PASSWORD } from '../../server/seed/demo-users';
import { designRound, until, type BuiltRound, type RoundOptions, type World } from './analysis-helpers';
import { TEST_SECRET } from './helpers/app';

export const ROOT = join(__dirname, '../..');

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

export interface ChildServer {
  url: string;
  child: ChildProcess;
  /** everything it printed */
  output(): string;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  alive(): boolean;
}

/** `server/main.ts` in a child process on `port`; resolves once it prints its banner. */
export async function startChildServer(
  databaseUrl: string,
  port: number,
  env: Record<string, string> = {},
): Promise<ChildServer> {
  const out: string[] = [];
  const child = spawn(process.execPath, ['--import', 'tsx', join(ROOT, 'server/main.ts')], {
    cwd: ROOT,
    env: {
      ...process.env,
      NODE_ENV: 'test',
      HOST: '127.0.0.1',
      PORT: String(port),
      DATABASE_URL: databaseUrl,
      JWT_SECRET: TEST_SECRET,
      LOG_LEVEL: 'warn',
      SIGN_IN_RATE_LIMIT: '1000',
      ANALYSIS_SWEEP_INTERVAL_S: '0',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let done = false;
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.once('exit', (code, signal) => {
      done = true;
      resolve({ code, signal });
    }),
  );
  child.stdout!.on('data', (b: Buffer) => out.push(String(b)));
  child.stderr!.on('data', (b: Buffer) => out.push(String(b)));
  const url = `http://127.0.0.1:${port}`;
  await until(
    'the server to listen',
    async () => {
      if (done) throw new Error(`server exited before listening: ${out.join('')}`);
      return out.join('').includes('Trueround listening on');
    },
    30_000,
    50,
  );
  return { url, child, output: () => out.join(''), exited, alive: () => !done };
}

export async function stopChild(s: ChildServer | null | undefined): Promise<void> {
  if (!s || !s.alive()) return;
  s.child.kill('SIGKILL');
  await s.exited;
}

export async function signInHttp(url: string, email: string): Promise<string> {
  const res = await fetch(`${url}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${await res.text()}`);
  return ((await res.json()) as { accessToken: string }).accessToken;
}

export const techEmail = () => demoUser('technician', 'fernhallow').email;

export interface HttpResult {
  status: number;
  body: unknown;
  headers: Headers;
}

/** A JSON request; a network failure is status 0 (as offline/sync.ts's TransportFailure says). */
export async function http(
  url: string,
  path: string,
  token: string | null,
  body?: unknown,
  method = body === undefined ? 'GET' : 'POST',
): Promise<HttpResult> {
  try {
    const res = await fetch(`${url}${path}`, {
      method,
      headers: {
        ...(token ? { authorization: `Bearer ${token}` } : {}),
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
      },
      body: body === undefined ? undefined : JSON.stringify(body),
      signal: AbortSignal.timeout(20_000),
    });
    const text = await res.text();
    let parsed: unknown = text;
    try {
      parsed = JSON.parse(text);
    } catch {
      /* not JSON */
    }
    return { status: res.status, body: parsed, headers: res.headers };
  } catch (e) {
    return { status: 0, body: { message: e instanceof Error ? e.message : String(e) }, headers: new Headers() };
  }
}

export { roundMaker } from './analysis-helpers';

export function buildRound(m: Pick<World, 'inst' | 'version' | 'sigma'>, o: RoundOptions = {}): BuiltRound {
  return designRound(m as World, o);
}

/** Readings stored per round id (0 for a round that has none), and how many rows share one id. */
export async function storedCounts(
  ds: DataSource,
  roundIds: string[],
): Promise<{ rounds: Set<string>; readings: Map<string, number>; duplicateIds: number }> {
  const rounds = new Set(
    ((await ds.query(`SELECT id FROM rounds WHERE id = ANY($1::uuid[])`, [roundIds])) as { id: string }[]).map(
      (r) => r.id,
    ),
  );
  const readings = new Map<string, number>(roundIds.map((id) => [id, 0]));
  for (const r of (await ds.query(
    `SELECT round_id, count(*)::int AS n FROM readings WHERE round_id = ANY($1::uuid[]) GROUP BY round_id`,
    [roundIds],
  )) as {
    round_id: string;
    n: number;
  }[]) {
    readings.set(r.round_id, r.n);
  }
  const [{ n }] = (await ds.query(
    `SELECT count(*)::int AS n FROM (SELECT id FROM readings WHERE round_id = ANY($1::uuid[]) GROUP BY id HAVING count(*) > 1) d`,
    [roundIds],
  )) as { n: number }[];
  return { rounds, readings, duplicateIds: n };
}
