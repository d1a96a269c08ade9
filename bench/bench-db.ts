/**
 * What the database benchmarks share: SQL as the test cluster's admin (TR_TEST_ADMIN_URL, else
 * the project's test cluster on 127.0.0.1:54330 — `npm run db:start -- --test` starts it), the
 * URL of a database on it, the real app served on a free port with a signed-in demo user, and
 * percentiles of timings.
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Client } from 'pg';
import type { DataSource } from 'typeorm';
import { createApp } from '../server/app';
import { loadConfig } from '../server/config';
import { makeLogger } from '../server/logger';
import { DEMO_PASSWORD } from '../server/seed/demo-users';

export const ADMIN_URL = process.env.TR_TEST_ADMIN_URL || 'postgres://trueround@127.0.0.1:54330/postgres';

export async function admin(sql: string): Promise<void> {
  const c = new Client({ connectionString: ADMIN_URL });
  await c.connect();
  try {
    await c.query(sql);
  } finally {
    await c.end();
  }
}

/** The URL of database `name` on the admin's cluster. */
export function databaseUrl(name: string): string {
  const u = new URL(ADMIN_URL);
  u.pathname = `/${name}`;
  return u.toString();
}

/** The p-th percentile (nearest rank) of xs. */
export const pct = (xs: number[], p: number): number => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)];
};

/** The real app on 127.0.0.1 (a free port) over `ds`, and a demo user's access token. */
export async function serveSignedIn(
  ds: DataSource,
  url: string,
  email: string,
): Promise<{ server: Server; base: string; token: string }> {
  const config = loadConfig({
    NODE_ENV: 'test',
    DATABASE_URL: url,
    JWT_SECRET: 'bench-secret-of-the-database-benches-0123456789',
    LOG_LEVEL: 'silent',
    PORT: '0',
    SIGN_IN_RATE_LIMIT: '1000',
  });
  const app = createApp({ config, dataSource: ds, logger: makeLogger(config) });
  const server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const signIn = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  if (!signIn.ok) throw new Error(`sign-in: ${signIn.status} ${await signIn.text()}`);
  const token = ((await signIn.json()) as { accessToken: string }).accessToken;
  return { server, base, token };
}
