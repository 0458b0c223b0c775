/** Headless Debian Chromium through playwright-core, with a small page-object for Steerwise. */
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, inject } from 'vitest';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

export const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-quic',
  '--no-first-run',
  '--disable-component-update',
  '--disable-sync',
];
export const SHOTS = path.resolve(__dirname, '../../test-results');

/** Each launch gets a fresh temporary profile (user-data-dir), removed on close. */
export async function launch(): Promise<Browser> {
  fs.mkdirSync(SHOTS, { recursive: true });
  return chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
}

export async function newPage(
  browser: Browser,
  baseUrl: string,
  viewport = { width: 1360, height: 900 },
): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ baseURL: baseUrl, viewport });
  const page = await context.newPage();
  page.setDefaultTimeout(20_000);
  return { context, page };
}

/**
 * One browser for the calling test file: launched in beforeAll, closed in
 * afterAll. `open` starts a fresh context and page at the app's base URL
 * (provided by global-setup.ts); call it and `browser` inside tests only.
 */
export function browserForFile() {
  const baseUrl = inject('baseUrl');
  let launched: Browser | undefined;
  beforeAll(async () => {
    launched = await launch();
  });
  afterAll(async () => {
    await launched?.close();
  });
  const browser = (): Browser => {
    if (!launched) throw new Error('the browser is launched in beforeAll: use it inside a test');
    return launched;
  };
  return {
    baseUrl,
    browser,
    open: (viewport?: { width: number; height: number }) => newPage(browser(), baseUrl, viewport),
  };
}

/** The CSRF token of the page's session, for API calls made with page.request. */
export async function csrf(page: Page): Promise<string> {
  const res = await page.request.get('/api/auth/csrf');
  return ((await res.json()) as { csrfToken: string }).csrfToken;
}

export async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto('/login');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => url.pathname === '/', { timeout: 30_000 });
}

export async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

/** The page's own alert (Next's route announcer is also role="alert", outside #main). */
export function alertIn(page: Page) {
  return page.locator('#main').getByRole('alert');
}
