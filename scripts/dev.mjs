#!/usr/bin/env node
/**
 * `npm run dev`: the API in watch mode on :8080 (development config) and the Expo dev
 * server for the web target on :8081, pointed at the API with EXPO_PUBLIC_API_URL.
 */
import { spawn, execFileSync } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ensureInstall } from './ensure-install.mjs';
import { localJwtSecret } from './secret.mjs';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');

ensureInstall();
const { startCluster } = await import('./pg.mjs');
const pg = await startCluster({ test: false });
const bin = (n) => join(ROOT, 'node_modules', '.bin', n);
const env = {
  ...process.env,
  NODE_ENV: 'development',
  DATABASE_URL: pg.url,
  JWT_SECRET: process.env.JWT_SECRET || localJwtSecret(),
  PORT: '8080',
  CORS_ORIGINS: 'http://localhost:8081,http://127.0.0.1:8081',
  SMTP_FAKE_PORT: process.env.SMTP_FAKE_PORT || '0',
};
execFileSync(bin('tsx'), ['server/cli/migrate.ts'], { cwd: ROOT, env, stdio: 'inherit' });
execFileSync(bin('tsx'), ['server/cli/seed.ts'], { cwd: ROOT, env, stdio: 'inherit' });
const api = spawn(bin('tsx'), ['watch', 'server/main.ts'], { cwd: ROOT, env, stdio: 'inherit' });
const web = spawn(bin('expo'), ['start', '--web', '--port', '8081'], {
  cwd: ROOT,
  env: {
    ...process.env,
    EXPO_PUBLIC_API_URL: 'http://127.0.0.1:8080',
    EXPO_OFFLINE: '1',
    EXPO_NO_TELEMETRY: '1',
    EXPO_UNSTABLE_HEADLESS: '1',
  },
  stdio: 'inherit',
});
const stop = () => {
  api.kill('SIGTERM');
  web.kill('SIGTERM');
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
