/**
 * Sign-in and roles in the real web build (playwright-core + Debian's chromium).
 * Demo logins from server/seed/demo-users.ts (invented people of the invented Fernhallow site).
 */
import { mkdirSync } from 'node:fs';
import type { Browser } from 'playwright-core';
import { DEMO_PASSWORD, demoUsers } from '@/server/seed/demo-users';
import { launch, newPage, PHONE, shot, signIn, WIDE, signOutViaMenu } from './helpers/browser';
import { startTestServer, type RunningServer } from './helpers/server';

const roleWords: Record<string, string> = {
  technician: 'Field technician',
  planner: 'Maintenance planner',
  engineer: 'Reliability engineer',
  admin: 'Site administrator',
};
const homePath: Record<string, string> = { technician: '/tech', planner: '/plan', engineer: '/eng', admin: '/admin' };

let server: RunningServer;
let browser: Browser;

beforeAll(async () => {
  mkdirSync('.tmp/screens', { recursive: true });
  server = await startTestServer();
  browser = await launch();
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

test('the app opens on the sign-in form', async () => {
  const { context, page } = await newPage(browser, PHONE);
  await page.goto(server.url);
  await page.getByTestId('sign-in-email').waitFor();
  expect(await page.getByText('Sign in', { exact: true }).first().isVisible()).toBe(true);
  await shot(page, 'sign-in-phone');
  await context.close();
});

const fernhallow = demoUsers.filter((u) => u.site === 'fernhallow');
test.each(fernhallow.map((u) => [u.role, u] as const))(
  '%s signs in and lands on their own home',
  async (role, user) => {
    const { context, page } = await newPage(browser, role === 'engineer' ? WIDE : PHONE);
    await signIn(page, server.url, user.email, DEMO_PASSWORD);
    await page.waitForURL(`**${homePath[role]}`);
    await expect(page.getByTestId('home-name').textContent()).resolves.toBe(user.name);
    await expect(page.getByTestId('home-site').textContent()).resolves.toBe('Fernhallow Works');
    await expect(page.getByTestId('home-role').textContent()).resolves.toBe(roleWords[role]);
    await shot(page, `home-${role}-${role === 'engineer' ? 'wide' : 'phone'}`);
    if (role === 'engineer') expect(await page.getByTestId('nav-side').isVisible()).toBe(true);

    // The session survives a reload.
    await page.reload();
    await page.getByTestId('home-name').waitFor();
    expect(page.url()).toContain(homePath[role]);
    await expect(page.getByTestId('home-name').textContent()).resolves.toBe(user.name);

    // The one guard (app/_layout.tsx): another role's area and the sign-in form send this user home.
    const other = role === 'planner' ? '/eng' : '/plan';
    await page.goto(`${server.url}${other}`);
    await page.getByTestId('home-name').waitFor();
    expect(new URL(page.url()).pathname).toBe(homePath[role]);
    await page.goto(`${server.url}/sign-in`);
    await page.getByTestId('home-name').waitFor();
    expect(new URL(page.url()).pathname).toBe(homePath[role]);

    // Signing out ends it.
    await signOutViaMenu(page);
    await page.goto(`${server.url}${homePath[role]}`);
    await page.getByTestId('sign-in-email').waitFor();
    await context.close();
  },
);

test('a wrong password says so and opens no session', async () => {
  const { context, page } = await newPage(browser, PHONE);
  await signIn(page, server.url, 'planner@fernhallow.example', 'not-the-password');
  await page.getByTestId('sign-in-failure').waitFor();
  expect(await page.getByTestId('sign-in-failure').textContent()).toBe(
    'E-mail or password is wrong. Check both and try again.',
  );
  const stored = await page.evaluate("window.localStorage.getItem('trueround.session')");
  expect(stored).toBeNull();
  await page.reload();
  await page.getByTestId('sign-in-email').waitFor();
  await shot(page, 'sign-in-wrong-password');
  await context.close();
});

test('the form names a missing field before asking the server', async () => {
  const { context, page } = await newPage(browser, PHONE);
  await page.goto(`${server.url}/sign-in`);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('sign-in-email-error').waitFor();
  expect(await page.getByTestId('sign-in-email-error').textContent()).toBe('Enter your e-mail address.');
  expect(await page.getByTestId('sign-in-password-error').textContent()).toBe('Enter your password.');
  await context.close();
});
