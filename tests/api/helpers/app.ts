/** The real app in-process for supertest, and small helpers around it. */
import { Writable } from 'node:stream';
import type { Express } from 'express';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import { createApp } from '../../../server/app';
import { loadConfig, type Config } from '../../../server/config';
import { makeLogger, type Logger } from '../../../server/logger';
import { hashPassword } from '../../../server/auth/passwords';
import { DEMO_PASSWORD } from '../../../server/seed/demo-users';

export const TEST_SECRET = 'test-secret-of-the-api-tests-0123456789';

export function testConfig(databaseUrl: string, env: Record<string, string> = {}): Config {
  return loadConfig({
    NODE_ENV: 'test',
    PORT: '0',
    DATABASE_URL: databaseUrl,
    JWT_SECRET: TEST_SECRET,
    LOG_LEVEL: 'silent',
    ...env,
  });
}

/** A logger whose output lines are kept in memory, to check what the server logs. */
export function memoryLogger(level: Config['LOG_LEVEL'] = 'info'): { logger: Logger; lines: string[] } {
  const lines: string[] = [];
  const sink = new Writable({
    write(chunk, _enc, cb) {
      lines.push(String(chunk));
      cb();
    },
  });
  return { logger: makeLogger({ LOG_LEVEL: level }, sink), lines };
}

export function testApp(
  dataSource: DataSource,
  databaseUrl: string,
  env: Record<string, string> = {},
  logger?: Logger,
): Express {
  return createApp({ config: testConfig(databaseUrl, env), dataSource, logger });
}

export interface Session {
  accessToken: string;
  refreshToken: string;
  user: { id: string; name: string; email: string; memberships: { siteId: string; siteName: string; role: string }[] };
}

export async function signIn(app: Express, email: string, password = DEMO_PASSWORD): Promise<Session> {
  const res = await request(app).post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as Session;
}

export const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

/**
 * Adds an invented person to a demo site with the demo password (for tests that need a second
 * technician, or an admin of the other site); returns their user id.
 */
export async function addMember(
  ds: DataSource,
  siteSlug: string,
  email: string,
  name: string,
  role: string,
): Promise<string> {
  const [u] = (await ds.query(
    `INSERT INTO "users" ("email", "name", "password_hash") VALUES ($1, $2, $3) RETURNING "id"`,
    [email, name, await hashPassword(DEMO_PASSWORD)],
  )) as { id: string }[];
  await ds.query(
    `INSERT INTO "memberships" ("user_id", "site_id", "role") SELECT $1, "id", $3 FROM "sites" WHERE "slug" = $2`,
    [u.id, siteSlug, role],
  );
  return u.id;
}
