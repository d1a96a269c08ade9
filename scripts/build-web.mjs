#!/usr/bin/env node
/**
 * Exports the Expo web build to dist/web, skipped when its inputs have not changed since the
 * last build (a hash of the app's sources, assets and config is kept in dist/web/.build-hash).
 * Metro's transform cache (keyed by each file's content and the transform settings) is kept
 * between exports, so an export after a change transforms only what changed: measured here
 * 16 s against 100–120 s with the cache cleared. `--force` exports anyway and clears the cache.
 */
import { execSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const OUT = join(ROOT, 'dist', 'web');
const INPUTS = [
  'app',
  'components',
  'hooks',
  'lib',
  'constants',
  'screens',
  'offline',
  'checklists',
  'shared',
  'demo',
  'assets',
  'app.json',
  'metro.config.js',
  'babel.config.js',
  'package-lock.json',
  'scripts/build-web.mjs',
  'scripts/service-worker.mjs',
];

function walk(p, out) {
  if (!existsSync(p)) return;
  const st = statSync(p);
  if (st.isDirectory()) {
    for (const f of readdirSync(p).sort()) walk(join(p, f), out);
  } else out.push(p);
}

export function inputsHash() {
  const files = [];
  for (const i of INPUTS) walk(join(ROOT, i), files);
  const h = createHash('sha256');
  for (const f of files) {
    h.update(f.slice(ROOT.length));
    h.update(readFileSync(f));
  }
  return h.digest('hex');
}

export async function buildWeb({ force = false, clearCache = force } = {}) {
  const want = inputsHash();
  const stamp = join(OUT, '.build-hash');
  if (
    !force &&
    existsSync(stamp) &&
    readFileSync(stamp, 'utf8').trim() === want &&
    existsSync(join(OUT, 'index.html'))
  ) {
    console.error('[web] build is up to date');
    return false;
  }
  console.error('[web] exporting the web build (expo export --platform web)…');
  const t0 = Date.now();
  execSync(`npx expo export --platform web --output-dir ${JSON.stringify(OUT)}${clearCache ? ' --clear' : ''}`, {
    cwd: ROOT,
    stdio: 'inherit',
    env: { ...process.env, EXPO_OFFLINE: '1', EXPO_NO_TELEMETRY: '1', EXPO_UNSTABLE_HEADLESS: '1', CI: '1' },
  });
  const sw = join(ROOT, 'scripts', 'service-worker.mjs');
  if (existsSync(sw)) {
    const mod = await import(sw);
    await mod.buildServiceWorker(OUT);
  }
  writeFileSync(stamp, want + '\n');
  console.error(`[web] exported in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  return true;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  buildWeb({ force: process.argv.includes('--force') }).catch((e) => {
    console.error(e.message);
    process.exit(1);
  });
}
