import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';
import { inject } from 'vitest';
import { openDatabase } from '../../src/db';
import { deleteSheet } from '../../src/lib/server/sheets';

export const CHROMIUM_PATH = '/usr/bin/chromium';
export const SCREENSHOT_DIR = resolve('test-results/screenshots');

/** Launches Debian's Chromium headless (Playwright gives it a fresh profile) with the flags that keep it off the network. */
export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--use-angle=swiftshader',
      '--enable-unsafe-swiftshader',
    ],
  });
}

/**
 * Waits until the island holding `inside` has hydrated (Astro removes the island's `ssr` attribute
 * then). A `client:visible` island hydrates only after it scrolls into view; a click before that
 * reaches the bare server-rendered form instead of the component.
 */
export async function waitForHydration(inside: Locator): Promise<void> {
  await inside.locator('xpath=ancestor-or-self::astro-island[1]').and(inside.page().locator('astro-island:not([ssr])')).waitFor({ timeout: 30_000 });
}

/**
 * The text a person sees in an element, read once it is scrolled into view: the sheet's pad sections below the first
 * screen skip their rendering until they near the viewport (content-visibility), and until then their innerText is "".
 */
export async function shownText(element: Locator): Promise<string> {
  await element.scrollIntoViewIfNeeded();
  // The browser renders a skipped section at the first frame after it came near the viewport, not at the scroll itself.
  await element.evaluate(
    (shown) => new Promise<void>((resolve) => {
      const check = () => (shown.checkVisibility({ contentVisibilityAuto: true }) ? resolve() : requestAnimationFrame(check));
      check();
    }),
  );
  return element.innerText();
}

/** The base URL of the server that tests/e2e/server.ts started for this run. */
export function baseUrl(): string {
  return inject('baseUrl');
}

/** Saves a full-page screenshot under test-results/screenshots and returns its path. */
export async function saveScreenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const path = join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path, fullPage: true });
  return path;
}

/** The folder where the app that tests/e2e/server.ts started writes every mail it sends. */
export function mailboxDir(): string {
  return inject('mailboxDir');
}

/** DATABASE_URL of the app that tests/e2e/server.ts started. */
export function appDatabaseUrl(): string {
  return inject('databaseUrl');
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    mailboxDir: string;
    databaseUrl: string;
  }
}

/** Signs in through the sign-in form with e-mail and password and waits until the app has left the sign-in page. */
export async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' });
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
}

/** Deletes sheets a test created, straight in the app's database: other browser tests list and search the demo team's sheets, so only the seeded ones may stay. */
export async function deleteCreatedSheets(sheetIds: readonly string[]): Promise<void> {
  const database = await openDatabase(appDatabaseUrl());
  try {
    for (const sheetId of sheetIds) await deleteSheet(database, sheetId, { userId: null });
  } finally {
    database.close();
  }
}
