/**
 * What the database benchmarks share: SQL as the test cluster's admin (TR_TEST_ADMIN_URL, else
 * the project's test cluster on 127.0.0.1:54330 — `npm run db:start -- --test` starts it), the
 * URL of a database on it, and percentiles of timings.
 */
import { Client } from 'pg';

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
