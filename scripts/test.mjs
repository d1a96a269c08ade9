#!/usr/bin/env node
/**
 * `npm test`: installs what is missing (npm packages, Debian's chromium), runs the gates (lint,
 * typecheck, format check; the first that fails stops the run and is named), starts the private
 * test PostgreSQL cluster, exports the web build when stale, and runs every jest project:
 * domain, api, app and e2e. Extra arguments go to jest (e.g. `npm test -- --selectProjects domain`);
 * with extra arguments the gates are skipped so targeted runs stay quick, unless `--gates` is given
 * (or TR_GATES=1). TR_GATES=0 skips them on a full run.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ensureInstall } from './ensure-install.mjs';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const argv = process.argv.slice(2);
const args = argv.filter((a) => a !== '--gates');
const t0 = Date.now();

/** The checks `npm test` runs before jest, in order; each is an npm script. */
const GATES = [
  { name: 'lint', script: 'lint' },
  { name: 'typecheck', script: 'typecheck' },
  { name: 'format', script: 'format:check' },
];

function gatesWanted() {
  if (process.env.TR_GATES === '0') return false;
  if (process.env.TR_GATES === '1' || argv.includes('--gates')) return true;
  return args.length === 0;
}

function runGates() {
  for (const gate of GATES) {
    const g0 = Date.now();
    console.error(`[test] gate ${gate.name}: npm run ${gate.script}`);
    const r = spawnSync('npm', ['run', '--silent', gate.script], { cwd: ROOT, stdio: 'inherit' });
    const secs = ((Date.now() - g0) / 1000).toFixed(0);
    if (r.status !== 0) {
      console.error(`[test] FAILED gate "${gate.name}" (npm run ${gate.script}, ${secs} s); jest did not run`);
      process.exit(r.status || 1);
    }
    console.error(`[test] gate ${gate.name} passed in ${secs} s`);
  }
}

function ensureChromium() {
  if (existsSync('/usr/bin/chromium')) return;
  if (process.getuid?.() !== 0) {
    throw new Error("Browser tests need Debian's chromium at /usr/bin/chromium: sudo apt-get install -y chromium");
  }
  console.error("[test] installing Debian's chromium for the browser tests…");
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  spawnSync('apt-get', ['update'], { stdio: 'inherit', env });
  const r = spawnSync('apt-get', ['install', '-y', '--no-install-recommends', 'chromium', 'fonts-noto-core'], {
    stdio: 'inherit',
    env,
  });
  if (r.status !== 0) throw new Error('apt-get install -y chromium failed');
}

async function main() {
  ensureInstall();
  if (gatesWanted()) runGates();
  const needsBrowser = !args.includes('--selectProjects') || args.includes('e2e');
  if (needsBrowser) ensureChromium();
  const { startCluster } = await import('./pg.mjs');
  const pg = await startCluster({ test: true });
  if (needsBrowser) {
    const { buildWeb } = await import('./build-web.mjs');
    await buildWeb();
  }
  const jest = join(ROOT, 'node_modules', '.bin', 'jest');
  // --forceExit is a backstop only: the suite exits by itself once every result is in (measured:
  // 193 s wall for 191 s of jest without it). The last leak was TanStack Query's 5-minute cache
  // timers in app tests (give test QueryClients gcTime: Infinity). A test that leaves a timer or
  // socket open must still not keep CI waiting; find one with `npm test -- --detectOpenHandles`.
  const r = spawnSync(jest, ['--ci', '--forceExit', ...args], {
    cwd: ROOT,
    stdio: 'inherit',
    env: { ...process.env, TR_TEST_ADMIN_URL: pg.adminUrl, TR_WEB_DIST: join(ROOT, 'dist', 'web') },
  });
  console.error(`[test] wall time ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  process.exit(r.status ?? 1);
}

main().catch((e) => {
  console.error(`[test] ${e.message}`);
  process.exit(1);
});
