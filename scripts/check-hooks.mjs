#!/usr/bin/env node
/**
 * Part of `npm run lint`: every module in hooks/ exports at least one React hook (`useX`).
 * Plain modules belong in lib/ (API client, photo picker, round-check runner) or in offline/
 * (loaders that read the device store).
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const HOOK_EXPORT = /^export\s+(?:async\s+)?(?:function\s+|const\s+)use[A-Z]\w*/m;

function walk(dir, out = []) {
  for (const f of readdirSync(dir)) {
    const p = join(dir, f);
    if (statSync(p).isDirectory()) walk(p, out);
    else if (/\.(ts|tsx)$/.test(f)) out.push(p);
  }
  return out;
}

const without = walk(join(ROOT, 'hooks')).filter((f) => !HOOK_EXPORT.test(readFileSync(f, 'utf8')));
if (without.length > 0) {
  for (const f of without) console.error(`${relative(ROOT, f)}: exports no hook (use…); move it to lib/ or offline/`);
  process.exit(1);
}
console.error(`[lint] every hooks/ module exports a hook`);
