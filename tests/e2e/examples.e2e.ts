import { readFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const EXAMPLE = '/examples/one-contact-by-hand';

let browser: Browser;
const created: string[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await deleteCreatedSheets(created);
  await browser?.close();
});

/** The text of the calculator's output row `index` once the worker has answered the latest change. */
async function outputAfterCompute(page: Page, index: number): Promise<string> {
  await page.waitForSelector('[data-testid="example-calculator"][data-pending="false"]');
  return (await page.getByTestId(`calculator-output-${index}`).textContent()) ?? '';
}

describe('worked examples, signed out', () => {
  let page: Page;

  beforeAll(async () => {
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  });

  it('lists the examples with a table of contents', async () => {
    const response = await page.goto(`${baseUrl()}/examples`, { waitUntil: 'networkidle' });
    expect(response?.status()).toBe(200);
    expect(await page.locator('[data-testid="examples-contents"] li').count()).toBeGreaterThanOrEqual(8);
    await saveScreenshot(page, 'examples-list');
  });

  it('renders an example with KaTeX and core-computed numbers, and offers sign-in instead of opening', async () => {
    const scripts: string[] = [];
    page.on('response', (response) => {
      const type = response.request().resourceType();
      if (type === 'script' || response.url().includes('worker')) scripts.push(new URL(response.url()).pathname);
    });
    const response = await page.goto(`${baseUrl()}${EXAMPLE}`, { waitUntil: 'networkidle' });
    expect(response?.status()).toBe(200);
    expect(await page.locator('.katex').count()).toBeGreaterThan(5);
    // Rolling without slipping: |roll rate| = ω R / ρ = 0.75 rad/s × 20 mm / 12 mm = 1.25 rad/s (the sheet's inputs, worked by hand).
    expect(await page.locator('[data-quote="steer.rollRate"]').first().textContent()).toBe('-1.25 rad/s');
    expect(await page.getByTestId('open-as-sheet-sign-in').getAttribute('href')).toBe(`/sign-in?callbackUrl=${encodeURIComponent(EXAMPLE)}`);
    await page.getByTestId('example-calculator').scrollIntoViewIfNeeded();
    expect(await outputAfterCompute(page, 2)).toBe('-1.25 rad/s');
    await saveScreenshot(page, 'example-one-contact');
    // How heavy the page is: every script it loaded (islands, React, the compute worker), gzipped as the build wrote them.
    const unique = [...new Set(scripts)].filter((path) => path.startsWith('/_astro/'));
    const gzipped = unique.reduce((sum, path) => sum + gzipSync(readFileSync(`dist/client${path}`, 'utf8')).length, 0);
    console.info(`example page: ${unique.length} scripts, ${(gzipped / 1024).toFixed(1)} KiB gzipped`);
    expect(unique.length).toBeGreaterThan(0);
  });

  it('recomputes when an input in the text changes', async () => {
    // ω R / ρ with the spin doubled: 1.5 rad/s × 20 mm / 12 mm = 2.5 rad/s.
    await page.getByTestId('calculator-input-spinRate').fill('1.5 rad/s');
    await expect.poll(() => outputAfterCompute(page, 2)).toBe('-2.5 rad/s');
    // And a roller of 16 mm: 1.5 × 20 / 16 = 1.875 rad/s.
    await page.getByTestId('calculator-input-rollerRadius').fill('16 mm');
    await expect.poll(() => outputAfterCompute(page, 2)).toBe('-1.875 rad/s');
    await page.getByTestId('calculator-input-rollerRadius').fill('16 parsecs');
    await expect.poll(async () => page.getByTestId('calculator-issues').isVisible()).toBe(true);
  });
});

describe('worked examples, signed in', () => {
  it('"Open as a new sheet" creates a sheet from the example and lands on it', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, EDITOR.email, EDITOR.password);
    await page.goto(`${baseUrl()}${EXAMPLE}`, { waitUntil: 'networkidle' });
    await page.getByTestId('open-as-sheet-button').click();
    await page.waitForURL(/\/sheets\/[^/#]+#object$/);
    created.push(new URL(page.url()).pathname.split('/')[2]!);
    await page.waitForSelector('#object');
    expect(await page.title()).toContain('Trunnion ball: slow spin about the vertical');
    await saveScreenshot(page, 'example-opened-as-sheet');
  });
});
