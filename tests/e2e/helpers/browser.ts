/**
 * Browser tests drive Debian's chromium through playwright-core (never a downloaded browser);
 * playwright gives each launch a fresh, empty profile.
 */
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { join } from 'node:path';

export const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium';

export async function launch(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--use-fake-device-for-media-stream',
      '--use-fake-ui-for-media-stream',
    ],
  });
}

export const PHONE = { width: 390, height: 844 };
export const WIDE = { width: 1280, height: 860 };

export async function newPage(browser: Browser, viewport = PHONE): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport, deviceScaleFactor: 1 });
  const page = await context.newPage();
  return { context, page };
}

/** Screenshots for a person to look at land in .tmp/screens (ignored by git). */
export async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(process.cwd(), '.tmp', 'screens', `${name}.png`), fullPage: true });
}

export async function signIn(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-submit').click();
}

/**
 * Signs in as a technician, waits until reference data has come down and the service worker
 * holds the app shell, goes offline and begins a boiler-house round; returns the round's id.
 */
export async function beginRoundOffline(
  context: BrowserContext,
  page: Page,
  baseUrl: string,
  email: string,
  password: string,
): Promise<string> {
  await signIn(page, baseUrl, email, password);
  await page.waitForURL('**/tech');
  await page.getByTestId('route-boiler-house-begin').waitFor();
  await page.evaluate('navigator.serviceWorker.ready.then(() => true)');
  await page.waitForFunction('!!navigator.serviceWorker.controller');
  await context.setOffline(true);
  await page.getByTestId('route-boiler-house-begin').click();
  await page.waitForURL('**/tech/round/**');
  return page.url().split('/').pop()!;
}

/** Signs out through the account menu and its confirmation; ends on the sign-in form. */
export async function signOutViaMenu(page: Page): Promise<void> {
  await page.getByTestId('account-menu').first().click();
  await page.getByTestId('sign-out').first().click();
  await page.getByTestId('sign-out-confirm').click();
  await page.getByTestId('sign-in-email').waitFor();
}
