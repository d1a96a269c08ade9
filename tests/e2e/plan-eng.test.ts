/**
 * The planner's and the engineer's screens in the real web build, on the demo history.
 *
 * Data: the demo plant (server/seed/demo.ts) and six days of its invented history
 * (server/seed/history.ts seedHistory: rounds pushed through the push service, each analysed by
 * the analysis job). In those days the feed pump suction gauge PI-302 is read as absolute on some
 * rounds (history-generator faults), which the balances name and which opens a priority-1
 * calibration work order; the instrument goes suspect until the calibration closes it.
 *
 * The planner filters to priority 1, opens that order, sees its evidence in plain words, assigns
 * it, takes it through triage, schedule and start, and closes it with as found / as left; the
 * engineer's health table then shows PI-302 back in service. The engineer opens the health table,
 * PI-302's trend (TrendChart with its band) and a round's cycle page, whose T–s chart carries the
 * saturation dome and a mark for every state point the analysis placed (checked against the
 * analysis the API returns), and finds that round again in the list of analysed rounds. The admin
 * invites an engineer, publishes a route version (the validator's refusal first, then the new
 * version's number) and changes an instrument's calibration interval; the invited person reads
 * the invitation in the dev mailbox, signs in with the one-time password it carries and lands on
 * the engineer's screen, sets a password of their own and signs in with it. Screenshots at 390 px and 1280 px go to .tmp/screens/.
 */
import { mkdirSync } from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import { makeDataSource } from '@/server/db';
import { DEMO_PASSWORD } from '@/server/seed/demo-users';
import { seedHistory } from '@/server/seed/history';
import { launch, newPage, PHONE, shot, signIn, WIDE } from './helpers/browser';
import { startTestServer, type RunningServer } from './helpers/server';

let server: RunningServer;
let browser: Browser;
const TAG = 'PI-302';

beforeAll(async () => {
  mkdirSync('.tmp/screens', { recursive: true });
  // the local SMTP fake, so the dev mailbox shows what the server sent
  server = await startTestServer({ SMTP_FAKE_PORT: '0', MAIL_SEND_INTERVAL_MS: '200' });
  const ds = makeDataSource(server.databaseUrl);
  await ds.initialize();
  const h = await seedHistory(ds, { days: 6 });
  await ds.destroy();
  expect(h.analysed).toBeGreaterThan(0);
  browser = await launch();
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

async function api<T>(path: string, token: string): Promise<T> {
  const r = await fetch(`${server.url}${path}`, { headers: { Authorization: `Bearer ${token}` } });
  if (!r.ok) throw new Error(`${path}: ${r.status} ${await r.text()}`);
  return (await r.json()) as T;
}

async function token(email: string): Promise<{ token: string; siteId: string }> {
  const r = await fetch(`${server.url}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  const b = (await r.json()) as { accessToken: string; user: { memberships: { siteId: string }[] } };
  return { token: b.accessToken, siteId: b.user.memberships[0].siteId };
}

async function openOrder(page: Page, url: string) {
  await page.goto(`${url}/plan/work-orders`);
  await page.getByTestId('wo-filter-priority-1').click();
  await page.getByTestId('wo-search').fill(TAG);
  const row = page.locator('[data-testid^="wo-row-"]').filter({ hasText: TAG }).first();
  await row.waitFor();
  return row;
}

test('the planner finds the priority-1 calibration order, reads its evidence, assigns it and closes it with as found and as left', async () => {
  const { context, page } = await newPage(browser, WIDE);
  await signIn(page, server.url, 'planner@fernhallow.example', DEMO_PASSWORD);
  await page.waitForURL('**/plan');
  const row = await openOrder(page, server.url);
  // every row under the priority filter is priority 1
  const marks = await page
    .getByTestId('wo-table')
    .getByLabel(/^Severity: /)
    .allTextContents();
  expect(marks.length).toBeGreaterThan(0);
  await shot(page, 'plan-work-orders-wide');
  await row.click();
  await page.waitForURL('**/plan/work-orders/**');
  await page.getByTestId('wo-detail').waitFor();
  await page.getByTestId('wo-caution').waitFor();
  expect(await page.getByTestId('wo-instrument').textContent()).toBe(TAG);
  // the evidence is folded by round (newest open): open older rounds until one says it in words
  const sentence = page.locator(`[data-testid^="wo-evidence-"][data-testid$="-${TAG}"]`).first();
  for (let k = 1; k < 5 && (await sentence.count()) === 0; k++) await page.getByTestId(`wo-round-${k}`).click();
  const evidence = await sentence.textContent();
  expect(evidence).toMatch(
    new RegExp(`^${TAG} reads [\\d.]+ (Pa|kPa|bar) (high|low): it read .* the balances put it at .* ± .*\\(95 %\\)`),
  );
  expect(await page.getByTestId(`wo-reading-${TAG}`).count()).toBeGreaterThan(0);
  await shot(page, 'plan-work-order-wide');

  // markup in a comment is text on the screen: nothing runs, no element is made from it (React
  // escapes text content; OWASP XSS prevention, rule "output encoding")
  const hostile = `<img src=x onerror="window.__xss=1"><script>window.__xss=2</script>`;
  await page.getByTestId('wo-comment-text').fill(hostile);
  await page.getByTestId('wo-comment-submit').click();
  await page.getByTestId('wo-history').getByText(hostile, { exact: false }).waitFor();
  expect(await page.evaluate('window.__xss ?? null')).toBeNull();
  expect(await page.locator('img[src="x"], #root script').count()).toBe(0);

  await page.getByTestId('wo-assign-me').click();
  await page.getByTestId('wo-assignee').filter({ hasText: 'Morgan Tilly' }).waitFor();
  await page.getByTestId('wo-triage-submit').click();
  await page.getByTestId('wo-status').filter({ hasText: 'Triaged' }).waitFor();
  await page.getByTestId('wo-schedule-submit').click();
  await page.getByTestId('wo-status').filter({ hasText: 'Scheduled' }).waitFor();
  await page.getByTestId('wo-start').click();
  await page.getByTestId('wo-status').filter({ hasText: 'Under way' }).waitFor();
  await page.getByTestId('wo-close-asfound').fill('5.62');
  await page.getByTestId('wo-close-asleft').fill('5.60');
  await page.getByTestId('wo-close-note').fill('Zero reset against the deadweight tester.');
  await page.getByTestId('wo-close-submit').click();
  await page.getByTestId('wo-status').filter({ hasText: 'Done' }).waitFor();
  await page.locator('[data-testid^="wo-calibration-"]').filter({ hasText: 'as found 5.62' }).waitFor();
  expect(await page.getByTestId('wo-action-error').count()).toBe(0);
  await shot(page, 'plan-work-order-closed-wide');
  await context.close();

  // the same list on a phone: cards
  const phone = await newPage(browser, PHONE);
  await signIn(phone.page, server.url, 'planner@fernhallow.example', DEMO_PASSWORD);
  await phone.page.waitForURL('**/plan');
  await phone.page.goto(`${server.url}/plan/work-orders`);
  // the six days of history open one order, closed above: show the done ones too
  await phone.page.getByTestId('wo-filters-toggle').click();
  await phone.page.getByTestId('wo-filter-status-done').click();
  await phone.page.locator('[data-testid^="wo-row-"]').first().waitFor();
  await shot(phone.page, 'plan-work-orders-phone');
  await phone.page.locator('[data-testid^="wo-row-"]').first().click();
  await phone.page.getByTestId('wo-detail').waitFor();
  await shot(phone.page, 'plan-work-order-phone');
  await phone.page.getByTestId('wo-evidence').scrollIntoViewIfNeeded();
  await phone.page.waitForTimeout(400); // let the scrolled tiles paint
  await shot(phone.page, 'plan-work-order-evidence-phone');
  await phone.context.close();
});

test('the engineer sees the instrument back in service, its trend, and a round’s cycle with the dome and every state point', async () => {
  const eng = await token('engineer@fernhallow.example');
  const { context, page } = await newPage(browser, WIDE);
  await signIn(page, server.url, 'engineer@fernhallow.example', DEMO_PASSWORD);
  await page.waitForURL('**/eng');
  await page.getByTestId('nav-eng-instruments').click();
  await page.getByTestId('health-table').waitFor();
  // the calibration closed the order: PI-302 is in service again
  await page.getByTestId(`health-${TAG}-status`).filter({ hasText: 'In service' }).waitFor();
  await page.getByTestId('health-table-sort-flags').click();
  await page.getByTestId('health-table-sort-flags').filter({ hasText: '↑' }).waitFor();
  await page.getByTestId('health-sort-worst').click();
  await shot(page, 'eng-health-wide');

  await page.getByTestId(`health-row-${TAG}`).click();
  await page.waitForURL(`**/eng/instruments/${TAG}`);
  await page.getByTestId('trend-chart').waitFor();
  expect(await page.getByTestId('trend-chart-band').count()).toBe(1);
  // the calibration closed above is counted against the evidence; the trend has ≥ 5 value and ≥ 4 date ticks
  await page.getByTestId('instrument-calibrations').filter({ hasText: '1 calibration recorded:' }).waitFor();
  expect(await page.getByTestId('trend-chart-value-tick').count()).toBeGreaterThanOrEqual(5);
  expect(await page.getByTestId('trend-chart-date-tick').count()).toBeGreaterThanOrEqual(4);
  // the detectability map: the balances check PI-302 through the deaerator's saturation and its twin
  await page
    .getByTestId('instrument-detectability')
    .filter({ hasText: `The balances notice ${TAG} from` })
    .waitFor();
  await shot(page, 'eng-instrument-wide');

  await page.getByTestId('instrument-point-0').click();
  await page.waitForURL('**/eng/rounds/**');
  const roundId = page.url().split('/').pop()!;
  await page.getByTestId('ts-dome').waitFor();
  const a = await api<{
    statePoints: {
      id: string;
      circuit: string;
      reconciled: { T: number | null; s: number | null };
      measured: { T: number | null; s: number | null };
    }[];
  }>(`/api/sites/${eng.siteId}/rounds/${roundId}/analysis`, eng.token);
  const cycle = a.statePoints.filter((p) => p.circuit === 'cycle');
  expect(cycle.length).toBeGreaterThan(10);
  for (const p of cycle) {
    if (p.reconciled.T !== null && p.reconciled.s !== null)
      expect(await page.getByTestId(`ts-point-r-${p.id}`).count()).toBe(1);
    if (p.measured.T !== null && p.measured.s !== null)
      expect(await page.getByTestId(`ts-point-m-${p.id}`).count()).toBe(1);
    expect(await page.getByTestId(`cycle-point-${p.id}`).count()).toBe(1);
  }
  // the isentropic ends of the HP and LP sections (demo unit: hp ms→hpx, lp lpi→lpe, lpx)
  expect(await page.locator('[data-testid^="ts-point-s-"]').count()).toBeGreaterThanOrEqual(2);
  // every state point of the unit's analysis is in the table, each saying where it was read
  for (const p of a.statePoints) expect(await page.getByTestId(`cycle-point-${p.id}`).count()).toBe(1);
  // no two point labels of the chart overlap (shared/charts label placement)
  const boxes = (
    await page
      .locator('[data-testid^="ts-label-"]')
      .evaluateAll((els) =>
        els.map((e) =>
          (e as unknown as { getBBox(): { x: number; y: number; width: number; height: number } }).getBBox(),
        ),
      )
  ).map((b) => ({ x: b.x, y: b.y, w: b.width, h: b.height }));
  expect(boxes.length).toBeGreaterThan(10);
  const overlap = (p: (typeof boxes)[number], q: (typeof boxes)[number]) =>
    p.x < q.x + q.w && q.x < p.x + p.w && p.y < q.y + q.h && q.y < p.y + p.h;
  for (let i = 0; i < boxes.length; i++)
    for (let j = i + 1; j < boxes.length; j++) expect(overlap(boxes[i], boxes[j])).toBe(false);
  await shot(page, 'eng-cycle-wide');
  // every balanced figure with its 95 % interval (GUM), or the words that it is not determinable
  const figs = (
    await api<{
      performance: { id: string; value: number | null; uncertainty?: { U: number; determinable: boolean } }[];
    }>(`/api/sites/${eng.siteId}/rounds/${roundId}/analysis`, eng.token)
  ).performance.filter((f) => f.value !== null && f.uncertainty && f.uncertainty.U > 0);
  expect(figs.length).toBeGreaterThan(3);
  for (const f of figs) {
    const value = await page.getByTestId(`cycle-figure-${f.id}-value`).innerText();
    const interval = await page.getByTestId(`cycle-figure-${f.id}-interval`).innerText();
    if (f.uncertainty!.determinable)
      expect(interval).toMatch(/^-?\d[\d.]* (%|K|MW|kJ\/kWh) to -?\d[\d.]* (%|K|MW|kJ\/kWh)( \(cut at (0|100) %\))?$/);
    else {
      expect(value).toBe('not determinable from these instruments');
      expect(interval).toMatch(/carr(y|ies) \d+ % of its variance/);
    }
  }
  await page.getByTestId('cycle-figures').scrollIntoViewIfNeeded();
  await page.waitForTimeout(400); // let the scrolled tiles paint
  await shot(page, 'eng-cycle-figures-wide');
  await page.getByTestId('cycle-points').scrollIntoViewIfNeeded();
  await page.waitForTimeout(400); // let the scrolled tiles paint
  await shot(page, 'eng-cycle-points-wide');
  await page.getByTestId('cycle-balances').scrollIntoViewIfNeeded();
  await page.waitForTimeout(400); // let the scrolled tiles paint
  await shot(page, 'eng-cycle-balances-wide');
  // the analysed rounds, newest first; a row opens its cycle page
  await page.getByTestId('nav-eng-cycle').click();
  await page.getByTestId('rounds-table').waitFor();
  const rows = page.locator('[data-testid^="round-row-"]');
  expect(await rows.count()).toBeGreaterThan(1);
  await shot(page, 'eng-rounds-wide');
  const first = (await rows.first().getAttribute('data-testid'))!.replace('round-row-', '');
  await rows.first().click();
  await page.waitForURL(`**/eng/rounds/${first}`);
  await page.getByTestId('ts-dome').waitFor();
  await context.close();

  const phone = await newPage(browser, PHONE);
  await signIn(phone.page, server.url, 'engineer@fernhallow.example', DEMO_PASSWORD);
  await phone.page.waitForURL('**/eng');
  await phone.page.goto(`${server.url}/eng/instruments`);
  await phone.page.getByTestId(`health-row-${TAG}`).waitFor();
  await shot(phone.page, 'eng-health-phone');
  await phone.page.goto(`${server.url}/eng/rounds/${roundId}`);
  await phone.page.getByTestId('ts-dome').waitFor();
  await shot(phone.page, 'eng-cycle-phone');
  await phone.page.getByTestId('cycle-points').scrollIntoViewIfNeeded();
  await phone.page.waitForTimeout(400); // let the scrolled tiles paint
  await shot(phone.page, 'eng-cycle-points-phone');
  await phone.page.goto(`${server.url}/eng/instruments/${TAG}`);
  await phone.page.getByTestId('trend-chart').waitFor();
  await shot(phone.page, 'eng-instrument-phone');
  await phone.context.close();
});

test('the admin invites a person, sees the site’s people, its instruments as configured, and the invitation in the dev mailbox', async () => {
  for (const [viewport, size] of [
    [WIDE, 'wide'],
    [PHONE, 'phone'],
  ] as const) {
    const { context, page } = await newPage(browser, viewport);
    await signIn(page, server.url, 'admin@fernhallow.example', DEMO_PASSWORD);
    await page.waitForURL('**/admin');
    await page.goto(`${server.url}/admin/people`);
    await page.getByTestId('person-planner@fernhallow.example').waitFor();
    expect(await page.getByTestId('person-planner@fernhallow.example').textContent()).toContain('Maintenance planner');
    if (size === 'wide') {
      await page.getByTestId('invite-email').fill('kim.ward@fernhallow.example');
      await page.getByTestId('invite-name').fill('Kim Ward');
      await page.getByTestId('invite-role-engineer').click();
      await page.getByTestId('invite-submit').click();
      await page.getByTestId('invite-sent').waitFor();
      await page
        .getByTestId('person-kim.ward@fernhallow.example')
        .filter({ hasText: 'Reliability engineer' })
        .filter({ hasText: 'Active' })
        .waitFor();
    }
    await shot(page, `admin-people-${size}`);
    await page.goto(`${server.url}/admin/instruments`);
    await page.getByTestId(`admin-instrument-${TAG}`).waitFor();
    await shot(page, `admin-instruments-${size}`);
    await page.goto(`${server.url}/admin/mailbox`);
    // the invitation went through the outbox to the SMTP fake
    const invitation = page
      .locator('[data-testid^="mail-"]')
      .filter({ hasText: 'Trueround: your access to Fernhallow Works' })
      .first();
    await invitation.waitFor({ timeout: 15_000 });
    let password = '';
    if (size === 'wide') {
      await invitation.getByRole('button').click();
      const text = page.locator('[data-testid$="-text"]').filter({ hasText: 'one-time password' }).first();
      await text.waitFor();
      password = /one-time password:\s+(\S+)/.exec((await text.textContent()) ?? '')?.[1] ?? '';
      expect(password).toHaveLength(16);
    }
    await shot(page, `admin-mailbox-${size}`);
    await context.close();

    if (size === 'wide') {
      // the invited person signs in with the one-time password from the mail and lands on the engineer's screen
      const kim = await newPage(browser, PHONE);
      await signIn(kim.page, server.url, 'kim.ward@fernhallow.example', password);
      await kim.page.waitForURL('**/eng');
      await kim.page.getByTestId('nav-eng-instruments').waitFor();
      expect(await kim.page.getByTestId('nav-admin-people').count()).toBe(0);
      // sets a password of their own on the password screen (from the shell's "Password") …
      const chosen = 'kestrel over the cooling tower 7';
      await kim.page.getByTestId('account-menu').first().click();
      await kim.page.getByTestId('password-open').first().click();
      await kim.page.waitForURL('**/password');
      await kim.page.getByTestId('password-currentPassword').fill(password);
      await kim.page.getByTestId('password-newPassword').fill('trueround1234');
      await kim.page.getByTestId('password-repeat').fill('trueround1234');
      await kim.page.getByTestId('password-submit').click();
      // the server's policy refuses a common password, under the field it names
      await kim.page.getByTestId('password-newPassword-error').waitFor();
      await kim.page.getByTestId('password-newPassword').fill(chosen);
      await kim.page.getByTestId('password-repeat').fill(chosen);
      await kim.page.getByTestId('password-submit').click();
      await kim.page.getByTestId('password-done').waitFor();
      await shot(kim.page, 'password-changed-phone');
      await kim.context.close();
      // … and from then on signs in with it, landing on the engineer's screen again; the one-time password is spent
      const again = await newPage(browser, PHONE);
      await signIn(again.page, server.url, 'kim.ward@fernhallow.example', password);
      await again.page.getByTestId('sign-in-failure').waitFor();
      await again.page.getByTestId('sign-in-password').fill(chosen);
      await again.page.getByTestId('sign-in-submit').click();
      await again.page.waitForURL('**/eng');
      await again.page.getByTestId('nav-eng-instruments').waitFor();
      await shot(again.page, 'invited-engineer-home-phone');
      await again.context.close();
    }
  }
});

test('the admin publishes a route version after the validator’s refusal, and changes an instrument’s calibration interval', async () => {
  const { context, page } = await newPage(browser, WIDE);
  await signIn(page, server.url, 'admin@fernhallow.example', DEMO_PASSWORD);
  await page.waitForURL('**/admin');
  await page.getByTestId('nav-admin-routes').click();
  await page.getByTestId('publish-route-turbine-hall').click();
  await page.getByTestId('publish-start-current').click();
  const current = JSON.parse(await page.getByTestId('publish-json').inputValue()) as {
    stops: { readings: { tag: string }[] }[];
  };
  current.stops[0].readings[1].tag = 'TI-999';
  await page.getByTestId('publish-json').fill(JSON.stringify(current, null, 2));
  await page.getByTestId('publish-submit').click();
  await page
    .getByTestId('publish-issue-0')
    .filter({ hasText: 'stops.0.readings.1.tag: TI-999 is not an instrument of unit' })
    .waitFor();
  await shot(page, 'admin-routes-refused-wide');
  current.stops[0].readings[1].tag = 'TI-102A';
  await page.getByTestId('publish-json').fill(JSON.stringify(current, null, 2));
  await page.getByTestId('publish-submit').click();
  await page.getByTestId('publish-done').filter({ hasText: 'Published version 2 of Turbine hall' }).waitFor();
  await shot(page, 'admin-routes-published-wide');

  await page.getByTestId('nav-admin-instruments').click();
  await page.getByTestId(`admin-instrument-${TAG}`).click();
  await page.getByTestId('instrument-edit').waitFor();
  await page.getByTestId('instrument-edit-interval').fill('0');
  await page.getByTestId('instrument-edit-save').click();
  await page.getByTestId('instrument-edit-interval-error').waitFor();
  await page.getByTestId('instrument-edit-interval').fill('200');
  await page.getByTestId('instrument-edit-save').click();
  await page.getByTestId('instrument-edit-saved').filter({ hasText: 'calibration interval changed' }).waitFor();
  await shot(page, 'admin-instrument-edit-wide');
  await page.getByTestId('instrument-edit-close').click();
  await page.getByTestId(`admin-instrument-${TAG}`).filter({ hasText: '200' }).waitFor();
  await context.close();
});
