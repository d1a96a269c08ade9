/**
 * On the phone (the real web build in Debian's chromium, offline): time from tapping Save on a
 * reading to the reading and its outbox row committed in the device's SQLite store (User Timing
 * measure "trueround:reading-saved" written by the round screen). Baseline in the same page:
 * localStorage.setItem of a reading-sized JSON (the cheapest persistence a browser has).
 * Needs the exported web build (npm run build:web) and runs its own test PostgreSQL.
 */
import { randomBytes } from 'node:crypto';
import { existsSync } from 'node:fs';
import { join } from 'node:path';

export async function run(): Promise<void> {
  const webDist = join(__dirname, '..', 'dist', 'web');
  if (!existsSync(join(webDist, 'index.html'))) {
    console.log('skipped: no web build in dist/web (run `npm run build:web` first)');
    return;
  }
  // @ts-expect-error plain .mjs module without types
  const { startCluster } = await import('../scripts/pg.mjs');
  const pg = await startCluster({ test: true });
  process.env.TR_TEST_ADMIN_URL = pg.adminUrl;
  process.env.TR_WEB_DIST = webDist;
  const { startTestServer } = await import('../tests/e2e/helpers/server');
  const { launch, newPage, signIn, PHONE } = await import('../tests/e2e/helpers/browser');
  const { boilerHouseRoute } = await import('../demo/routes/boiler-house');
  const server = await startTestServer({ PHOTO_DIR: `/tmp/tr-bench-${randomBytes(3).toString('hex')}` });
  const browser = await launch();
  try {
    const { context, page } = await newPage(browser, PHONE);
    await signIn(page, server.url, 'tech@fernhallow.example', 'trueround-demo');
    await page.getByTestId('route-boiler-house-begin').waitFor();
    await context.setOffline(true);
    await page.getByTestId('route-boiler-house-begin').click();
    await page.waitForURL('**/tech/round/**');
    const specs = boilerHouseRoute.stops.flatMap((s, i) => s.readings.map((r) => ({ stop: i, r })));
    let n = 0;
    for (const { stop, r } of specs) {
      await page.getByTestId(`stop-${stop}`).click();
      const value = ((r.band.min + r.band.max) / 2).toFixed(1);
      await page.getByTestId(`reading-${r.tag}-input`).fill(value);
      await page.getByTestId(`reading-${r.tag}-save`).click();
      await page
        .getByTestId(`reading-${r.tag}-input`)
        .and(page.locator(`[value="${Number(value)}"]`))
        .waitFor();
      n++;
    }
    const saved = (await page.evaluate(
      "performance.getEntriesByName('trueround:reading-saved').map((e) => e.duration)",
    )) as number[];
    const base = (await page.evaluate(`(() => {
      const out = [];
      const json = JSON.stringify({ id: crypto.randomUUID(), tag: 'PI-101', valueTyped: 67.2, unit: 'bar', reference: 'gauge', deviceTime: new Date().toISOString(), flags: [] });
      for (let i = 0; i < ${n}; i++) { const t = performance.now(); localStorage.setItem('bench-' + i, json); out.push(performance.now() - t); }
      for (let i = 0; i < ${n}; i++) localStorage.removeItem('bench-' + i);
      return out;
    })()`)) as number[];
    const q = (xs: number[], p: number) =>
      [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(p * xs.length))];
    console.log(`readings saved in the browser: ${saved.length} of ${n}`);
    console.log('| what | p50 (ms) | p95 (ms) | ratio (p50) |');
    console.log('| --- | ---: | ---: | ---: |');
    console.log(
      `| baseline: localStorage.setItem of one reading | ${q(base, 0.5).toFixed(3)} | ${q(base, 0.95).toFixed(3)} | 1 |`,
    );
    console.log(
      `| Save → reading + outbox row committed (expo-sqlite, OPFS) | ${q(saved, 0.5).toFixed(1)} | ${q(saved, 0.95).toFixed(1)} | ${(q(saved, 0.5) / Math.max(q(base, 0.5), 1e-3)).toFixed(0)} |`,
    );
    await context.close();
  } finally {
    await browser.close();
    await server.stop();
  }
}
