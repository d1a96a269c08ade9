/**
 * One phone, two technicians, in the real web build (playwright-core + Debian's chromium against
 * the production server and a fresh PostgreSQL): technician A records offline and signs out; B
 * signs in on the same phone and syncs. A's readings are not sent under B's token — they wait on
 * the phone, shown to B as waiting for A — and when A signs in again they are stored as A's: the
 * round's technician and every reading's recorder are A (server/sync/push.ts, offline/sync.ts).
 *
 * Values typed are the demo unit's design point (invented data, shared/cycle demoDesignReadings).
 */
import { mkdirSync } from 'node:fs';
import { Client } from 'pg';
import type { Browser, Page } from 'playwright-core';
import { boilerHouseRoute } from '@/demo/routes/boiler-house';
import { hashPassword } from '@/server/auth/passwords';
import { DEMO_PASSWORD } from '@/server/seed/demo-users';
import { demoDesignReadings } from '@/demo/unit';
import { barometricFromElevation } from '@/shared/units';
import { beginRoundOffline, launch, newPage, PHONE, shot, signIn, WIDE, signOutViaMenu } from './helpers/browser';
import { startTestServer, type RunningServer } from './helpers/server';

let server: RunningServer;
let browser: Browser;
let db: Client;
const ids: Record<'a' | 'b', string> = { a: '', b: '' };

const baroPa = barometricFromElevation(112);
const design = Object.fromEntries(demoDesignReadings(baroPa).map((r) => [r.instrumentTag, r.shown.value]));
design['PI-001'] = baroPa / 100; // mbar

beforeAll(async () => {
  mkdirSync('.tmp/screens', { recursive: true });
  server = await startTestServer();
  browser = await launch();
  db = new Client({ connectionString: server.databaseUrl });
  await db.connect();
  // a second technician of Fernhallow (invented), with the demo password
  const [b] = (
    await db.query(
      `INSERT INTO users (email, name, password_hash) VALUES ('ash.renner@fernhallow.example', 'Ash Renner', $1) RETURNING id`,
      [await hashPassword(DEMO_PASSWORD)],
    )
  ).rows as { id: string }[];
  await db.query(
    `INSERT INTO memberships (user_id, site_id, role) SELECT $1, id, 'technician' FROM sites WHERE slug = 'fernhallow'`,
    [b.id],
  );
  ids.b = b.id;
  ids.a = (
    (await db.query(`SELECT id FROM users WHERE email = 'tech@fernhallow.example'`)).rows[0] as { id: string }
  ).id;
});

afterAll(async () => {
  await db?.end();
  await browser?.close();
  await server?.stop();
});

async function enter(page: Page, tag: string) {
  await page.getByTestId(`reading-${tag}-input`).fill(design[tag].toFixed(2));
  await page.getByTestId(`reading-${tag}-save`).click();
  await page
    .getByTestId(`reading-${tag}-input`)
    .and(page.locator(`[value="${Number(design[tag].toFixed(2))}"]`))
    .waitFor();
}

async function signOut(page: Page) {
  await signOutViaMenu(page);
}

test("A records offline and signs out; B signs in: A's readings wait for A, and are stored as A's when A signs in again", async () => {
  const { context, page } = await newPage(browser, PHONE);
  // A, offline: a round with the first two stops' readings
  const roundId = await beginRoundOffline(context, page, server.url, 'tech@fernhallow.example', DEMO_PASSWORD);
  const tags: string[] = [];
  for (const [s, stop] of boilerHouseRoute.stops.slice(0, 2).entries()) {
    await page.getByTestId('stop-name').filter({ hasText: stop.name }).waitFor();
    for (const r of stop.readings) {
      await enter(page, r.tag);
      tags.push(r.tag);
    }
    if (s === 0) await page.getByTestId('stop-next').click();
  }
  await page.getByTestId('nav-tech-home').first().click();
  await page
    .getByTestId('sync-summary')
    .filter({ hasText: /waiting to send/ })
    .waitFor();
  expect(await page.getByTestId('sync-summary').textContent()).toMatch(
    new RegExp(`^${tags.length + 1} waiting to send`),
  );
  await signOut(page); // still offline: nothing could be sent

  // B on the same phone, online again
  await context.setOffline(false);
  await page.getByTestId('sign-in-email').fill('ash.renner@fernhallow.example');
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').click();
  await page.waitForURL('**/tech');
  await page.getByTestId('home-name').filter({ hasText: 'Ash Renner' }).waitFor();
  await page.getByTestId('nav-tech-outbox').click();
  await page.getByTestId('sync-now').click();
  const note = page.getByTestId(`others-waiting-${ids.a}`);
  await note.waitFor();
  expect(await note.textContent()).toBe(
    `Waiting for Robin Aske: ${tags.length + 1} records made on this device. They are sent as Robin Aske's when Robin Aske signs in here again, never as yours.`,
  );
  await page.getByTestId('outbox-waiting').filter({ hasText: /^0$/ }).waitFor();
  await shot(page, 'shared-device-waiting-for-a-phone');
  await page.setViewportSize(WIDE);
  await shot(page, 'shared-device-waiting-for-a-wide');
  await page.setViewportSize(PHONE);
  // B's today page does not offer A's round to carry on
  await page.getByTestId('nav-tech-home').first().click();
  await page.getByTestId('route-boiler-house-begin').waitFor();
  // nothing of A's reached the server under B (nor at all)
  expect(
    (await db.query(`SELECT count(*)::int AS n FROM rounds WHERE id = $1 OR technician_id = $2`, [roundId, ids.b]))
      .rows[0].n,
  ).toBe(0);
  expect((await db.query(`SELECT count(*)::int AS n FROM readings WHERE recorded_by = $1`, [ids.b])).rows[0].n).toBe(0);

  // A signs in again on the phone: A's records go, as A's
  await signOut(page);
  await signIn(page, server.url, 'tech@fernhallow.example', DEMO_PASSWORD);
  await page.waitForURL('**/tech');
  await page.getByTestId('nav-tech-outbox').click();
  await page.getByTestId('sync-now').click();
  await page.getByTestId('outbox-waiting').filter({ hasText: /^0$/ }).waitFor({ timeout: 30_000 });
  await page.getByTestId('others-waiting').waitFor({ state: 'detached' });
  const round = (await db.query(`SELECT technician_id FROM rounds WHERE id = $1`, [roundId])).rows as {
    technician_id: string;
  }[];
  expect(round).toEqual([{ technician_id: ids.a }]);
  const readings = (
    await db.query(
      `SELECT i.tag, r.recorded_by FROM readings r JOIN instruments i ON i.id = r.instrument_id WHERE r.round_id = $1 ORDER BY i.tag`,
      [roundId],
    )
  ).rows as { tag: string; recorded_by: string }[];
  expect(readings).toEqual([...tags].sort().map((tag) => ({ tag, recorded_by: ids.a })));
  await context.close();
});
