#!/usr/bin/env node
/**
 * Installs the npm dependencies when they are missing or older than package-lock.json.
 * Uses Node built-ins only: it runs before anything is installed.
 */
import { execSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');

export function ensureInstall() {
  const lock = join(ROOT, 'package-lock.json');
  const stamp = join(ROOT, 'node_modules', '.trueround-lock-hash');
  const want = createHash('sha256').update(readFileSync(lock)).digest('hex');
  const have = existsSync(stamp) ? readFileSync(stamp, 'utf8').trim() : '';
  if (have === want && existsSync(join(ROOT, 'node_modules', '.bin', 'tsx'))) return false;
  // An `npm install` run by hand since the last check leaves npm's own record newer than the lock.
  const npmRecord = join(ROOT, 'node_modules', '.package-lock.json');
  if (
    existsSync(npmRecord) &&
    statSync(npmRecord).mtimeMs >= statSync(lock).mtimeMs &&
    existsSync(join(ROOT, 'node_modules', '.bin', 'tsx'))
  ) {
    writeFileSync(stamp, want + '\n');
    return false;
  }
  console.error('[install] installing npm dependencies (npm ci)…');
  const t0 = Date.now();
  execSync('npm ci --no-audit --no-fund --loglevel=error', { cwd: ROOT, stdio: 'inherit' });
  writeFileSync(stamp, want + '\n');
  console.error(`[install] done in ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  return true;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) ensureInstall();
