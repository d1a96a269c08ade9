#!/usr/bin/env node
/**
 * Writes the service worker of the web build: `sw.js` in the export folder precaches every file
 * `expo export` wrote (entry JS, the expo-sqlite worker and its .wasm, fonts, images, index.html),
 * so the app shell loads with no network. Navigations fall back to /index.html (single-page
 * routing), never for /api/. A new worker takes over at once (skipWaiting + clientsClaim); the
 * caches of older builds are removed.
 *
 * Cross-origin isolation: the server sends COOP same-origin / COEP require-corp / CORP same-origin
 * on every response, sw.js included. Workbox stores the whole response, headers too, so documents
 * and workers served from the precache keep those headers; every precached file is same-origin,
 * so COEP lets them load.
 *
 * Called by scripts/build-web.mjs after `expo export`; also runnable: `node scripts/service-worker.mjs dist/web`.
 */
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generateSW } from 'workbox-build';

/** Largest file to precache. The entry bundle is about 2 MB today; leave room to grow. */
export const MAX_PRECACHE_FILE_BYTES = 16 * 1024 * 1024;

/** Names with a content hash (Expo's `_expo/static/…/entry-<hash>.js`, `font.<hash>.ttf`) need no cache-busting revision. */
const HASHED = /[.-][0-9a-f]{16,}\.[a-z0-9]+$/i;

export function serviceWorkerConfig(outDir) {
  return {
    globDirectory: outDir,
    globPatterns: ['**/*.{html,js,mjs,wasm,css,json,ttf,otf,woff,woff2,png,jpg,jpeg,gif,svg,webp,ico,txt,webmanifest}'],
    globIgnores: ['sw.js', 'sw.js.map', 'workbox-*.js', '.build-hash', 'metadata.json'],
    swDest: join(outDir, 'sw.js'),
    maximumFileSizeToCacheInBytes: MAX_PRECACHE_FILE_BYTES,
    dontCacheBustURLsMatching: HASHED,
    navigateFallback: '/index.html',
    navigateFallbackDenylist: [/^\/api(\/|$)/],
    // API calls are never cached: they go to the network, and the outbox handles being offline.
    runtimeCaching: [],
    skipWaiting: true,
    clientsClaim: true,
    cleanupOutdatedCaches: true,
    // One file, served with no-cache by server/web.ts (its name matches the service-worker rule).
    inlineWorkboxRuntime: true,
    sourcemap: false,
    mode: 'production',
  };
}

/** Writes `<outDir>/sw.js`; returns the number and bytes of precached files and any warnings. */
export async function buildServiceWorker(outDir) {
  const dir = resolve(outDir);
  if (!existsSync(join(dir, 'index.html'))) {
    throw new Error(`buildServiceWorker: ${dir} has no index.html; run expo export first`);
  }
  const { count, size, warnings } = await generateSW(serviceWorkerConfig(dir));
  for (const w of warnings) console.error(`[sw] warning: ${w}`);
  console.error(`[sw] sw.js precaches ${count} files, ${(size / 1024 / 1024).toFixed(2)} MB`);
  return { count, size, warnings };
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  buildServiceWorker(process.argv[2] ?? 'dist/web').catch((e) => {
    console.error(e.message);
    process.exit(1);
  });
}
