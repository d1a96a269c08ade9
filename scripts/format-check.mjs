#!/usr/bin/env node
/**
 * `npm run format:check`: Prettier's check (config in .prettierrc.json, exclusions in
 * .prettierignore).
 *
 * Until the tree has been formatted once, `.format-base` names the commit the formatter arrived
 * at, and only files added since that commit (plus untracked ones) are checked, so branches in
 * flight do not reformat files other branches edit. The commit that runs `npm run format` over the
 * whole tree deletes `.format-base`; from then on every file is checked. `--all` checks the whole
 * tree regardless.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const prettier = join(ROOT, 'node_modules', '.bin', 'prettier');
const baseFile = join(ROOT, '.format-base');
const all = process.argv.includes('--all') || !existsSync(baseFile);

const git = (...a) => execFileSync('git', a, { cwd: ROOT, encoding: 'utf8' }).split('\n').filter(Boolean);

let targets = ['.'];
if (!all) {
  const base = readFileSync(baseFile, 'utf8').trim();
  const added = git('diff', '--name-only', '--diff-filter=A', '--find-renames', base);
  const untracked = git('ls-files', '--others', '--exclude-standard');
  targets = [...new Set([...added, ...untracked])].filter((f) => existsSync(join(ROOT, f)));
  if (targets.length === 0) {
    console.error(`[format] no files added since ${base.slice(0, 7)} (.format-base); nothing to check`);
    process.exit(0);
  }
}
const r = spawnSync(prettier, ['--check', '--ignore-unknown', ...targets], { cwd: ROOT, stdio: 'inherit' });
if (r.status !== 0)
  console.error('[format] run `npm run format` (or `npx prettier --write <file>`) and commit the result');
process.exit(r.status ?? 1);
