/**
 * The real server for browser tests: a fresh database (migrated, demo loaded) and the
 * production app serving the exported web build on a loopback port.
 */
import { randomBytes } from 'node:crypto';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { Client } from 'pg';
import { loadConfig } from '@/server/config';
import { makeDataSource } from '@/server/db';
import { start } from '@/server/main';
import { seedDemo } from '@/server/seed/demo';

export const ADMIN_URL = process.env.TR_TEST_ADMIN_URL || 'postgres://trueround@127.0.0.1:54330/postgres';
export const WEB_DIST = process.env.TR_WEB_DIST || join(process.cwd(), 'dist', 'web');

export interface RunningServer {
  url: string;
  databaseUrl: string;
  stop(): Promise<void>;
}

export async function startTestServer(env: Record<string, string> = {}): Promise<RunningServer> {
  if (!existsSync(join(WEB_DIST, 'index.html'))) {
    throw new Error(`no web build at ${WEB_DIST}: run npm test (it exports the build) or npm run build:web`);
  }
  const name = `tr_e2e_${randomBytes(5).toString('hex')}`;
  const admin = new Client({ connectionString: ADMIN_URL });
  await admin.connect();
  await admin.query(`create database ${name}`);
  await admin.end();
  const databaseUrl = ADMIN_URL.replace(/\/[^/]+$/, `/${name}`);

  const ds = makeDataSource(databaseUrl);
  await ds.initialize();
  await ds.runMigrations();
  await seedDemo(ds);
  await ds.destroy();

  const config = loadConfig({
    NODE_ENV: 'production',
    HOST: '127.0.0.1',
    PORT: '0',
    DATABASE_URL: databaseUrl,
    JWT_SECRET: randomBytes(32).toString('hex'),
    WEB_DIST,
    LOG_LEVEL: 'warn',
    ...env,
  });
  const running = await start(config);
  return {
    url: running.url,
    databaseUrl,
    async stop() {
      await running.stop();
      const c = new Client({ connectionString: ADMIN_URL });
      await c.connect();
      await c.query(`drop database if exists ${name} with (force)`);
      await c.end();
    },
  };
}
