#!/usr/bin/env node
/**
 * `npm start`: everything from a fresh clone to a running Trueround on http://127.0.0.1:8080.
 *  1. install npm dependencies when missing;
 *  2. provision and start the private PostgreSQL cluster (scripts/pg.mjs);
 *  3. migrate, and load the demo site when the database is empty;
 *  4. export the web build (skipped when up to date);
 *  5. serve app and API on one port.
 */
import { spawn, execFileSync } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ensureInstall } from './ensure-install.mjs';
import { localJwtSecret } from './secret.mjs';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const t0 = Date.now();

/** Seconds each step took, printed when the server is ready. */
const steps = [];
let stepStart = t0;
function stepDone(name) {
  const now = Date.now();
  steps.push(`${name} ${((now - stepStart) / 1000).toFixed(1)} s`);
  stepStart = now;
}

async function main() {
  ensureInstall();
  stepDone('install');
  const { startCluster } = await import('./pg.mjs');
  const pg = await startCluster({ test: false });
  stepDone('PostgreSQL');
  const env = {
    ...process.env,
    NODE_ENV: 'production',
    DATABASE_URL: pg.url,
    JWT_SECRET: process.env.JWT_SECRET || localJwtSecret(),
    HOST: process.env.HOST || '127.0.0.1',
    PORT: process.env.PORT || '8080',
    WEB_DIST: join(ROOT, 'dist', 'web'),
    // The local SMTP fake runs in the server process on loopback; the admin's mailbox page shows what it got.
    SMTP_FAKE_PORT: process.env.SMTP_FAKE_PORT || '0',
  };
  const tsx = join(ROOT, 'node_modules', '.bin', 'tsx');
  console.error('[start] migrating and loading the demo site when empty…');
  execFileSync(tsx, ['server/cli/migrate.ts'], { cwd: ROOT, env, stdio: 'inherit' });
  stepDone('migrate');
  execFileSync(tsx, ['server/cli/seed.ts'], { cwd: ROOT, env, stdio: 'inherit' });
  stepDone('seed');
  const { buildWeb } = await import('./build-web.mjs');
  await buildWeb();
  stepDone('web export');
  const server = spawn(tsx, ['server/main.ts'], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'inherit'] });
  let announced = false;
  server.stdout.on('data', async (chunk) => {
    process.stdout.write(chunk);
    if (!announced && /listening|http:\/\//i.test(String(chunk))) {
      announced = true;
      stepDone('server');
      console.error(`[start] steps: ${steps.join(', ')}`);
      const { demoLoginsText } = await import('./demo-logins.mjs');
      console.log(
        `\nTrueround is ready at http://${env.HOST}:${env.PORT}  (${((Date.now() - t0) / 1000).toFixed(0)} s from npm start)\n`,
      );
      console.log(demoLoginsText());
      console.log('Stop with Ctrl-C; `npm run db:stop` stops PostgreSQL.\n');
    }
  });
  const stop = (sig) => server.kill(sig);
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
  server.on('exit', (code) => process.exit(code ?? 0));
}

main().catch((e) => {
  console.error(`[start] ${e.message}`);
  process.exit(1);
});
