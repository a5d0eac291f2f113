import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { baseUrl, launchBrowser, saveScreenshot } from './browser';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

describe('home page', () => {
  it('loads, says what Slipless does, and serves every font from the app itself', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const fontResponses: { url: string; status: number; type: string }[] = [];
    page.on('response', (response) => {
      if (response.request().resourceType() === 'font') {
        fontResponses.push({ url: response.url(), status: response.status(), type: response.headers()['content-type'] ?? '' });
      }
    });
    const response = await page.goto(baseUrl(), { waitUntil: 'networkidle' });
    expect(response?.status()).toBe(200);
    await expect(page.title()).resolves.toContain('Slipless');
    expect(await page.locator('h1').innerText()).toMatch(/roller/i);
    await page.evaluate(() => document.fonts.ready);

    const origin = new URL(baseUrl()).origin;
    expect(fontResponses.length).toBeGreaterThan(0);
    for (const font of fontResponses) {
      expect(new URL(font.url).origin).toBe(origin);
      expect(font.status).toBe(200);
      expect(font.type).toMatch(/font|woff/);
    }
    const loaded = await page.evaluate(() =>
      ['JetBrains Mono', 'IBM Plex Sans', 'KaTeX_Main'].map((family) => document.fonts.check(`16px "${family}"`)),
    );
    expect(loaded).toEqual([true, true, true]);
    await saveScreenshot(page, 'home');
    await page.close();
  });

  it('reports health ok through the running server', async () => {
    const response = await fetch(`${baseUrl()}/api/health`);
    expect(response.status).toBe(200);
    expect(await response.json()).toMatchObject({ status: 'ok', database: { reachable: true }, migrations: { upToDate: true } });
  });
});
