/**
 * The guards on a round at 390 px, offline, in the real web build: a skip undone, the field's
 * saved / not-saved state, the round reopened at the stop it was left on, sign-out warning offline,
 * Finish held up by a required photo (and "finish with gaps" naming it), and a finished round
 * shown read-only with a banner that says where its records are.
 *
 * Values typed are the demo unit's design point (invented data, demo/unit demoDesignReadings); the
 * barometer's design value is the ICAO standard atmosphere at the site's 112 m.
 */
import { mkdirSync } from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import { boilerHouseRoute } from '@/demo/routes/boiler-house';
import { demoDesignReadings } from '@/demo/unit';
import { DEMO_PASSWORD } from '@/server/seed/demo-users';
import { barometricFromElevation } from '@/shared/units';
import { beginRoundOffline, launch, newPage, PHONE, shot, WIDE } from './helpers/browser';
import { startTestServer, type RunningServer } from './helpers/server';

let server: RunningServer;
let browser: Browser;

const baroPa = barometricFromElevation(112);
const design = Object.fromEntries(demoDesignReadings(baroPa).map((r) => [r.instrumentTag, r.shown.value]));
design['PI-001'] = baroPa / 100; // mbar
const typed = (tag: string) => design[tag].toFixed(2);

beforeAll(async () => {
  mkdirSync('.tmp/screens', { recursive: true });
  server = await startTestServer();
  browser = await launch();
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const stateOf = (page: Page, tag: string) => page.getByTestId(`reading-${tag}-state`);

test('skip undone, resume at the stop, sign-out warns offline, Finish held by a required photo, finished round read-only', async () => {
  const { context, page } = await newPage(browser, PHONE);
  const roundId = await beginRoundOffline(context, page, server.url, 'tech@fernhallow.example', DEMO_PASSWORD);

  // Stop 1: the barometer. Open the skip reasons: the way back says no skip, not "keep a reading".
  await page.getByTestId('stop-name').filter({ hasText: boilerHouseRoute.stops[0].name }).waitFor();
  await page.getByTestId('reading-PI-001-skip').click();
  await page.getByTestId('reading-PI-001-skip').filter({ hasText: 'Don’t skip it' }).waitFor();
  await page.getByTestId('reading-PI-001-skip-0').click();
  await page.getByTestId('reading-PI-001-skipped').filter({ hasText: 'Gauge not reachable' }).waitFor();
  // Undo the skip: the field opens with the cursor in it; the skip stays until a value is saved.
  await page.getByTestId('reading-PI-001-unskip').click();
  await page.waitForFunction(`document.activeElement?.getAttribute('data-testid') === 'reading-PI-001-input'`);
  await page.getByTestId('reading-PI-001-unskip-note').waitFor();
  await page.getByTestId('reading-PI-001-input').fill(typed('PI-001'));
  await stateOf(page, 'PI-001').filter({ hasText: 'Not saved yet' }).waitFor();
  await shot(page, 'guards-unsaved-phone');
  await page.getByTestId('reading-PI-001-save').click();
  await stateOf(page, 'PI-001').filter({ hasText: 'Saved on this device' }).waitFor();
  await page.getByTestId('reading-PI-001-skipped').waitFor({ state: 'detached' });
  await page.getByTestId('stop-0-progress').filter({ hasText: '1 of 2 done' }).waitFor();

  // Stop 2, then a reload (offline, from the service worker): the round opens at stop 2, not stop 1.
  await page.getByTestId('stop-next').click();
  await page.getByTestId('stop-name').filter({ hasText: boilerHouseRoute.stops[1].name }).waitFor();
  await page.waitForTimeout(300); // the stop is written to the device store just after it shows
  await page.reload();
  await page.getByTestId('round-screen').waitFor();
  await page.getByTestId('stop-name').filter({ hasText: boilerHouseRoute.stops[1].name }).waitFor();

  // Sign-out is in the account menu and asks first; offline it says what signing out would cost.
  expect(await page.getByTestId('sign-out').count()).toBe(0);
  await page.getByTestId('account-menu').click();
  await page.getByTestId('sign-out').click();
  await page.getByTestId('sign-out-offline').filter({ hasText: 'signing in again needs signal' }).waitFor();
  // the round and the barometer's skip and its reading: three records, none sent
  await page.getByTestId('sign-out-unsent').filter({ hasText: '3 of your records are not sent' }).waitFor();
  await shot(page, 'guards-sign-out-offline-phone');
  await page.getByTestId('sign-out-cancel').click();
  await page.getByTestId('account-panel').waitFor({ state: 'detached' });
  await page.getByTestId('round-screen').waitFor();

  // Straight to Finish from the last stop: the required photos hold up "Finish round".
  const last = boilerHouseRoute.stops.length - 1;
  await page.getByTestId(`stop-${last}`).click();
  await page.getByTestId('round-roundCheck').click();
  await page.getByTestId('finish-panel').waitFor();
  await page.getByTestId('finish-blocked').waitFor();
  await page.getByTestId('missing-photo-bfp-seal-leak').filter({ hasText: 'Photo required' }).waitFor();
  await page.getByTestId('missing-PI-302').waitFor();
  expect(await page.getByTestId('finish-confirm').count()).toBe(0);
  await shot(page, 'guards-finish-blocked-phone');
  await page.getByTestId('finish-with-gaps').click();
  await page.waitForURL('**/tech');

  // The finished round: values shown, no field to type in, a note saying why; the banner says unsent.
  await page.goto(`${server.url}/tech/round/${roundId}?stop=0`);
  await page.getByTestId('round-finished').filter({ hasText: 'on this device only, not sent yet' }).waitFor();
  await page
    .getByTestId('reading-PI-001-value')
    .filter({ hasText: String(Number(typed('PI-001'))) })
    .waitFor();
  await page.getByTestId('reading-PI-001-readonly').filter({ hasText: 'can no longer be changed' }).waitFor();
  expect(await page.getByTestId('reading-PI-001-input').count()).toBe(0);
  expect(await page.getByTestId('round-roundCheck').count()).toBe(0);
  await shot(page, 'guards-finished-phone');
  await page.setViewportSize(WIDE);
  await page.getByTestId('nav-side').waitFor();
  await page.getByTestId('round-finished').waitFor();
  await page.getByTestId('reading-PI-001-readonly').waitFor();
  await shot(page, 'guards-finished-wide');
  await page.setViewportSize(PHONE);

  // Online and synced: the banner says everything is sent.
  await context.setOffline(false);
  await page.getByTestId('nav-tech-outbox').click();
  await page.getByTestId('sync-now').click();
  await page.getByTestId('outbox-waiting').filter({ hasText: /^0$/ }).waitFor({ timeout: 30_000 });
  await page.goto(`${server.url}/tech/round/${roundId}`);
  await page.getByTestId('round-finished').filter({ hasText: 'Everything is sent' }).waitFor();
  await context.close();
});
