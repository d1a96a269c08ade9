/**
 * A whole round walked offline in the real web build, then synced (playwright-core + Debian's
 * chromium against the production server and a fresh PostgreSQL).
 *
 * Values typed are the demo unit's design point (invented data that closes every balance with
 * IAPWS-IF97), shown in each gauge's own unit. The SI check uses the definition of gauge pressure
 * (absolute = gauge + barometric, ISO 80000-4) with the round's own barometer reading.
 */
import { mkdirSync, mkdtempSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Client } from 'pg';
import type { Browser, Page } from 'playwright-core';
import sharp from 'sharp';
import { boilerHouseRoute } from '@/demo/routes/boiler-house';
import { demoDesignReadings } from '@/demo/unit';
import { barometricFromElevation } from '@/shared/units';
import { beginRoundOffline, launch, newPage, PHONE, shot } from './helpers/browser';
import { startTestServer, type RunningServer } from './helpers/server';

const photoDir = mkdtempSync(join(tmpdir(), 'tr-photos-'));
let server: RunningServer;
let browser: Browser;
let jpeg: string;

// Fernhallow Works stands at 112 m: the ICAO standard atmosphere gives the barometer's design value.
const baroPa = barometricFromElevation(112);
const design = Object.fromEntries(demoDesignReadings(baroPa).map((r) => [r.instrumentTag, r.shown.value]));
design['PI-001'] = baroPa / 100; // mbar
const typed = (tag: string) => design[tag].toFixed(2);
/** How the field shows a stored value: the number, without trailing zeros. */
const shown = (tag: string) => String(Number(typed(tag)));
const SKIPPED = 'FI-202';
/** The checks the route asks a photo of (boiler-house template): Finish is blocked until each has one. */
const PHOTO_CHECKS = boilerHouseRoute.stops.flatMap((s) => s.checks.filter((c) => c.photoRequired).map((c) => c.id));

beforeAll(async () => {
  mkdirSync('.tmp/screens', { recursive: true });
  jpeg = join(photoDir, 'seal.jpg');
  await sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 120, g: 90, b: 60 } } })
    .jpeg()
    .toFile(jpeg);
  server = await startTestServer({ PHOTO_DIR: photoDir });
  browser = await launch();
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

async function enter(page: Page, tag: string, value: string) {
  const input = page.getByTestId(`reading-${tag}-input`);
  await input.fill(value);
  await page.getByTestId(`reading-${tag}-save`).click();
}

test('a technician walks the boiler-house round offline, reloads mid-round, finishes and syncs', async () => {
  const { context, page } = await newPage(browser, PHONE);
  // Reference data has come down once, and the service worker holds the app shell; then offline.
  const roundId = await beginRoundOffline(context, page, server.url, 'tech@fernhallow.example', 'trueround-demo');

  const stops = boilerHouseRoute.stops;
  for (let s = 0; s < stops.length; s++) {
    const stop = stops[s];
    await page.getByTestId('stop-name').filter({ hasText: stop.name }).waitFor();
    for (const r of stop.readings) {
      if (r.tag === SKIPPED) {
        await page.getByTestId(`reading-${r.tag}-skip`).click();
        await page.getByTestId(`reading-${r.tag}-skip-0`).click();
        await page.getByTestId(`reading-${r.tag}-skipped`).waitFor();
        continue;
      }
      if (r.tag === 'TI-101') {
        // 15 K above the boiling point at the drum pressure: the phone asks for a re-read.
        await enter(page, 'TI-101', (design['TI-101'] + 15).toFixed(2));
        await page.getByTestId('reading-TI-101-reread').waitFor();
        await page.getByTestId('reading-TI-101-flag-saturation').waitFor();
        await shot(page, 'round-reread-drum');
      }
      await enter(page, r.tag, typed(r.tag));
      await page
        .getByTestId(`reading-${r.tag}-input`)
        .and(page.locator(`[value="${shown(r.tag)}"]`))
        .waitFor();
    }
    await page.getByTestId('reading-TI-101-reread').waitFor({ state: 'detached' });
    for (const c of stop.checks) {
      if (c.kind !== 'text') {
        const button = page.getByTestId(
          c.kind === 'yes-no' ? `check-${c.id}-${c.expected === false ? 'no' : 'yes'}` : `check-${c.id}-opt-0`,
        );
        await button.click();
        // The answer shows as chosen once the device store holds it.
        await button.and(page.locator('[aria-selected="true"]')).waitFor();
      } else {
        await page.getByTestId(`check-${c.id}-text`).fill('All in order');
        await page.getByTestId(`check-${c.id}-text`).blur();
      }
      if (c.photoRequired) {
        const chooser = page.waitForEvent('filechooser');
        await page.getByTestId(`check-${c.id}-photo`).click();
        await (await chooser).setFiles(jpeg);
        await page.getByTestId(`photo-check-${c.id}`).waitFor();
      }
    }
    const total = stop.readings.length + stop.checks.length;
    await page
      .getByTestId(`stop-${s}-progress`)
      .filter({ hasText: `${total} of ${total} done` })
      .waitFor();

    if (s === 2) {
      // Mid-round, still offline: reload. The app opens from the service worker with every entry.
      await page.reload();
      await page.getByTestId('round-screen').waitFor();
      // it reopens at the stop it was on, not the first
      await page.getByTestId('stop-name').filter({ hasText: stop.name }).waitFor();
      await page.getByTestId('stop-0').click();
      await page
        .getByTestId('reading-PI-001-input')
        .and(page.locator(`[value="${shown('PI-001')}"]`))
        .waitFor();
      await page.getByTestId('stop-1').click();
      await page
        .getByTestId('reading-PI-103-input')
        .and(page.locator(`[value="${shown('PI-103')}"]`))
        .waitFor();
      await page.getByTestId('photo-check-bfp-seal-leak').waitFor();
      await shot(page, 'round-after-offline-reload');
      await page.getByTestId(`stop-${s}`).click();
    }
    if (s < stops.length - 1) await page.getByTestId('stop-next').click();
  }

  await page.getByTestId('round-roundCheck').click();
  await page.getByTestId('finish-panel').waitFor();
  await shot(page, 'round-finish');
  // FI-202 is optional: skipping it leaves nothing missing; every required photo was taken.
  await page.getByTestId('finish-complete').waitFor();
  await page.getByTestId('finish-confirm').click();
  await page.waitForURL('**/tech');

  await context.setOffline(false);
  await page.getByTestId('nav-tech-outbox').click();
  await page.getByTestId('sync-now').click();
  await page.getByTestId('outbox-waiting').filter({ hasText: /^0$/ }).waitFor({ timeout: 30_000 });
  await page
    .getByTestId('outbox-photos-stored')
    .filter({ hasText: new RegExp(`^${PHOTO_CHECKS.length}$`) })
    .waitFor({ timeout: 30_000 });
  await shot(page, 'outbox-synced');

  const db = new Client({ connectionString: server.databaseUrl });
  await db.connect();
  try {
    const readings = await db.query(
      `select r.id, i.tag, r.value_typed::float8 as typed, r.unit, r.reference, r.value_si, r.skip_reason, r.supersedes
         from readings r join instruments i on i.id = r.instrument_id where r.round_id = $1`,
      [roundId],
    );
    const tags = boilerHouseRoute.stops.flatMap((s) => s.readings.map((r) => r.tag));
    // One row per reading taken, plus the drum thermometer's corrected re-read; none twice.
    expect(readings.rowCount).toBe(tags.length + 1);
    expect(new Set(readings.rows.map((r) => r.id)).size).toBe(readings.rowCount);
    const current = readings.rows.filter((r) => !readings.rows.some((o) => o.supersedes === r.id));
    expect(current.map((r) => r.tag).sort()).toEqual([...tags].sort());

    const by = Object.fromEntries(current.map((r) => [r.tag, r]));
    expect(by[SKIPPED].skip_reason).toBe('Gauge not reachable');
    expect(by[SKIPPED].value_si).toBeNull();
    const baro = Number(typed('PI-001')) * 100; // the round's barometer, mbar → Pa
    expect(by['PI-001'].value_si).toBeCloseTo(baro, 6);
    // As typed and in SI: 67.xx bar(g) → typed × 1e5 Pa + barometric pressure.
    expect(by['PI-101']).toMatchObject({ typed: Number(typed('PI-101')), unit: 'bar', reference: 'gauge' });
    expect(by['PI-101'].value_si).toBeCloseTo(Number(typed('PI-101')) * 1e5 + baro, 4);
    // °C → K (ITS-90: T/K = t/°C + 273.15).
    expect(by['TI-101'].value_si).toBeCloseTo(Number(typed('TI-101')) + 273.15, 9);
    const wrong = readings.rows.find((r) => r.tag === 'TI-101' && r.supersedes === null);
    expect(wrong.typed).toBeCloseTo(design['TI-101'] + 15, 2);

    const photos = await db.query(
      `select status, storage_key, thumb_key, width, height from photos where round_id = $1`,
      [roundId],
    );
    expect(photos.rowCount).toBe(PHOTO_CHECKS.length);
    for (const p of photos.rows) {
      expect(p).toMatchObject({ status: 'stored', width: 640, height: 480 });
      expect(p.thumb_key).toBeTruthy();
      expect(existsSync(join(photoDir, p.thumb_key))).toBe(true);
    }

    const round = await db.query(`select status from rounds where id = $1`, [roundId]);
    expect(round.rows[0].status).toBe('finished');
  } finally {
    await db.end();
  }
  await context.close();
});
