#!/usr/bin/env node
/**
 * Writes Expo Router's typed-route declarations (`.expo/types/router.d.ts`) from the files in
 * `app/`, as `expo start` does, so `npm run typecheck` checks every `href` without a dev server.
 * Uses the generator that ships with the installed Expo CLI.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
process.env.EXPO_ROUTER_APP_ROOT = join(ROOT, 'app');

const fromRoot = createRequire(join(ROOT, 'package.json'));
const fromExpo = createRequire(fromRoot.resolve('expo/package.json'));
const fromCli = createRequire(fromExpo.resolve('@expo/cli/package.json'));
const { getTypedRoutesDeclarationFile } = fromCli('@expo/router-server/build/typed-routes/generate');
const { requireContext } = fromCli('expo-router/internal/testing');
const { EXPO_ROUTER_CTX_IGNORE } = fromCli('expo-router/_ctx-shared');

const ctx = requireContext(process.env.EXPO_ROUTER_APP_ROOT, true, EXPO_ROUTER_CTX_IGNORE);
const file = getTypedRoutesDeclarationFile(ctx, {});
if (!file) throw new Error('typed routes: the generator returned nothing for app/');
const out = join(ROOT, '.expo', 'types');
mkdirSync(out, { recursive: true });
writeFileSync(join(out, 'router.d.ts'), file);
