import { mkdirSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launchBrowser, saveScreenshot, SCREENSHOT_DIR, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
// A seeded demo sheet that raises warnings beside its sections (content/docs/warnings.md names it as an example).
const DEMO_SHEET = 'Retrofit fingers: mounting review';
const REFERENCE_PAGES = readdirSync(new URL('../../content/docs/', import.meta.url)).filter((name) => name.endsWith('.md')).length;

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

async function signedOutPage(): Promise<Page> {
  return (await browser.newContext({ viewport: { width: 1400, height: 900 } })).newPage();
}

describe('the reference, signed out', () => {
  it('lists every reference page at /docs, linked from the header', async () => {
    const page = await signedOutPage();
    await page.goto(baseUrl(), { waitUntil: 'networkidle' });
    await page.locator('header').getByRole('link', { name: 'Reference', exact: true }).click();
    await page.waitForURL((url) => url.pathname === '/docs');
    const links = page.locator('[data-testid="reference-pages"] a');
    expect(await links.count()).toBe(REFERENCE_PAGES);
    expect(await links.allInnerTexts()).toContain('Warning codes');
    await saveScreenshot(page, 'docs-index');
    await page.close();
  });

  it('renders a page with KaTeX math, its own table of contents and heading anchors', async () => {
    const page = await signedOutPage();
    const response = await page.goto(`${baseUrl()}/docs/acceleration`, { waitUntil: 'networkidle' });
    expect(response?.status()).toBe(200);
    expect(await page.locator('article h1').innerText()).toContain('Acceleration feed-forward');
    // KaTeX typesets into .katex with a MathML copy for screen readers (KaTeX's documented output).
    expect(await page.locator('article .katex').count()).toBeGreaterThan(0);
    expect(await page.locator('article .katex math').count()).toBeGreaterThan(0);
    const contents = page.locator('[data-testid="page-contents"] a');
    expect(await contents.allInnerTexts()).toContain('Contact model');
    await contents.filter({ hasText: 'Contact model' }).click();
    await page.waitForURL((url) => url.hash === '#contact-model');
    expect(await page.locator('h2#contact-model a.heading-anchor').getAttribute('href')).toBe('#contact-model');
    await saveScreenshot(page, 'docs-acceleration');
    await page.close();
  });

  it('answers 404 for a page that does not exist', async () => {
    const response = await fetch(`${baseUrl()}/docs/no-such-page`);
    expect(response.status).toBe(404);
  });

  it('finds a page by a word from its body and opens it with the keyboard', async () => {
    const page = await signedOutPage();
    await page.goto(`${baseUrl()}/docs`, { waitUntil: 'networkidle' });
    const box = page.getByRole('combobox', { name: 'Search the reference and examples' });
    // "gzip" appears in the body of the log page only (not in any title or summary).
    await box.click();
    await box.pressSequentially('gzip');
    const first = page.getByRole('option').first();
    await first.waitFor();
    expect(await first.innerText()).toContain('Controller logs and the log mapping');
    await box.press('ArrowDown');
    await box.press('ArrowUp');
    expect(await page.getByRole('option', { selected: true }).innerText()).toContain('Controller logs');
    await saveScreenshot(page, 'docs-search');
    await box.press('Enter');
    await page.waitForURL((url) => url.pathname === '/docs/log-mapping');
    await page.close();
  });
});

describe('warning notes on a sheet', () => {
  it('link to their code in the reference', async () => {
    const page = await (await browser.newContext({ viewport: { width: 1400, height: 1000 } })).newPage();
    await signIn(page, EDITOR.email, EDITOR.password);
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}&q=${encodeURIComponent('Retrofit')}`)).json();
    const sheetId = list.items.find((s: { title: string }) => s.title === DEMO_SHEET).id;
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const note = page.locator('[data-margin] [data-warning]').first();
    await note.waitFor({ timeout: 20_000 });
    const code = await note.getAttribute('data-warning');
    const help = note.getByRole('link', { name: 'What this means' });
    expect(await help.getAttribute('href')).toBe(`/docs/warnings#${code!.toLowerCase()}`);
    // It opens in a new tab beside the sheet.
    const [reference] = await Promise.all([page.context().waitForEvent('page'), help.click()]);
    await reference.waitForLoadState('networkidle');
    expect(new URL(reference.url()).pathname).toBe('/docs/warnings');
    const section = reference.locator(`h2#${code!.toLowerCase()}`);
    expect(await section.innerText()).toContain(code!);
    expect(await section.evaluate((heading) => heading.getBoundingClientRect().top)).toBeLessThan(200);
    mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await reference.screenshot({ path: join(SCREENSHOT_DIR, 'docs-warning-anchor.png') });
    await reference.close();
    await page.close();
  });
});
