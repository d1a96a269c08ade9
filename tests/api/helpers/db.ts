/**
 * A fresh PostgreSQL database per test file: `create database tr_api_<time>_<random>` on the
 * test cluster (TR_TEST_ADMIN_URL, set by `npm test`), migrated and loaded with the demo,
 * dropped afterwards. Leftovers of crashed runs older than an hour are dropped on the way in.
 */
import { randomBytes } from 'node:crypto';
import { Client } from 'pg';
import type { DataSource } from 'typeorm';
import { makeDataSource } from '../../../server/db';
import { seedDemo } from '../../../server/seed/demo';

export const ADMIN_URL = process.env.TR_TEST_ADMIN_URL || 'postgres://trueround@127.0.0.1:54330/postgres';

export interface TestDb {
  name: string;
  url: string;
  dataSource: DataSource;
  /** Runs SQL as the cluster admin (outside the test database). */
  admin(sql: string): Promise<void>;
  drop(): Promise<void>;
}

async function adminQuery(sql: string): Promise<{ rows: Record<string, unknown>[] }> {
  const c = new Client({ connectionString: ADMIN_URL });
  await c.connect();
  try {
    return await c.query(sql);
  } finally {
    await c.end();
  }
}

async function dropStale(): Promise<void> {
  const { rows } = await adminQuery(`select datname from pg_database where datname like 'tr\\_api\\_%'`);
  const cutoff = Math.floor(Date.now() / 1000) - 3600;
  for (const r of rows) {
    const m = /^tr_api_(\d+)_[0-9a-f]+$/.exec(String(r.datname));
    if (m && Number(m[1]) < cutoff) await adminQuery(`drop database if exists "${r.datname}" with (force)`);
  }
}

export function urlFor(name: string): string {
  const u = new URL(ADMIN_URL);
  u.pathname = `/${name}`;
  return u.toString();
}

export interface CreateOptions {
  migrate?: boolean;
  seed?: boolean;
}

export async function createTestDatabase({ migrate = true, seed = true }: CreateOptions = {}): Promise<TestDb> {
  await dropStale();
  const name = `tr_api_${Math.floor(Date.now() / 1000)}_${randomBytes(4).toString('hex')}`;
  await adminQuery(`create database "${name}"`);
  const url = urlFor(name);
  const dataSource = makeDataSource(url, { poolSize: 4, applicationName: 'trueround-api-test' });
  await dataSource.initialize();
  if (migrate) await dataSource.runMigrations();
  if (migrate && seed) await seedDemo(dataSource);
  return {
    name,
    url,
    dataSource,
    admin: async (sql) => {
      await adminQuery(sql);
    },
    drop: async () => {
      if (dataSource.isInitialized) await dataSource.destroy();
      await adminQuery(`drop database if exists "${name}" with (force)`);
    },
  };
}
