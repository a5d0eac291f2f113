import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext } from 'playwright-core';
import { openDatabase } from '../../src/db';
import { largestSheet } from '../helpers/largest-sheet';
import { addRevisions } from '../helpers/revisions';
import { appDatabaseUrl, baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, signIn } from './browser';

const REVISIONS = 5_000;

let browser: Browser;
let editor: BrowserContext;
const created: string[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
  editor = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  await signIn(await editor.newPage(), 'editor@tarnwhistle.example', 'slipless-demo');
});

afterAll(async () => {
  await browser?.close();
  await deleteCreatedSheets(created);
});

/** Creates a sheet in the editor's current team through the API and returns its id. */
async function createSheet(title: string, document: unknown): Promise<string> {
  const { currentTeam } = await (await editor.request.get(`${baseUrl()}/api/me`)).json();
  const answer = await editor.request.post(`${baseUrl()}/api/sheets`, { data: { teamId: currentTeam, title, document } });
  expect(answer.status()).toBe(201);
  const { sheetId } = await answer.json();
  created.push(sheetId);
  return sheetId;
}

/** Status, size and time of one GET as the signed-in editor. */
async function timedGet(path: string) {
  const started = performance.now();
  const response = await editor.request.get(`${baseUrl()}${path}`);
  const body = await response.body();
  return { status: response.status(), bytes: body.length, ms: Math.round(performance.now() - started), text: body.toString('utf8') };
}

describe('sheets too big to show at once', () => {
  it(`pages a history of ${REVISIONS + 1} revisions: the page and the API send one page`, async () => {
    const doc = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
    const sheetId = await createSheet('Peg: long tuning history', doc);
    const database = await openDatabase(appDatabaseUrl());
    try {
      await addRevisions(database, sheetId, REVISIONS, doc);
    } finally {
      database.close();
    }

    const api = await timedGet(`/api/sheets/${sheetId}/revisions`);
    const listed = JSON.parse(api.text);
    const again = await timedGet(`/api/sheets/${sheetId}/revisions?page=100`);
    console.log(`GET /api/sheets/{id}/revisions with ${REVISIONS + 1} revisions: ${api.bytes} bytes in ${api.ms} ms (page 100: ${again.ms} ms)`);
    expect(api.status).toBe(200);
    expect(listed.items).toHaveLength(50);
    expect(listed).toMatchObject({ total: REVISIONS + 1, nextPage: 2 });
    expect(api.bytes).toBeLessThan(50_000);

    const html = await timedGet(`/sheets/${sheetId}/history`);
    console.log(`history page with ${REVISIONS + 1} revisions: ${html.bytes} bytes in ${html.ms} ms`);
    expect(html.bytes).toBeLessThan(300_000);

    const compare = await timedGet(`/sheets/${sheetId}/compare?from=1&to=${REVISIONS + 1}`);
    console.log(`compare page of r1 and r${REVISIONS + 1}: ${compare.bytes} bytes in ${compare.ms} ms`);
    expect(compare.status).toBe(200);
    expect(compare.bytes).toBeLessThan(300_000);
    expect(compare.text).toMatch(/<option value="1" selected[^>]*>rev 1<\/option>/);

    const page = await editor.newPage();
    await page.goto(`${baseUrl()}/sheets/${sheetId}/history`, { waitUntil: 'networkidle' });
    const rows = page.locator('tr[data-revision]');
    expect(await rows.count()).toBe(50);
    expect(await rows.first().getAttribute('data-revision')).toBe(String(REVISIONS + 1));
    const pages = page.getByTestId('history-pages');
    expect(await pages.innerText()).toMatch(/page 1 of 101/);
    await saveScreenshot(page, 'history-long-page-1');
    await pages.getByRole('link', { name: 'Older' }).click();
    await page.waitForURL(/page=2/);
    expect(await page.locator('tr[data-revision]').first().getAttribute('data-revision')).toBe(String(REVISIONS + 1 - 50));
    expect(await page.getByTestId('history-pages').getByRole('link', { name: 'Newer' }).count()).toBe(1);
    await page.close();
  });

  it('keeps the report of the largest sheet small: the derivation of one finger at a time, with links to the others', async () => {
    const sheetId = await createSheet('Largest hand', largestSheet());
    const report = await timedGet(`/sheets/${sheetId}/report`);
    const again = await timedGet(`/sheets/${sheetId}/report?derivation=7`);
    console.log(`report of the largest sheet: ${report.bytes} bytes in ${report.ms} ms (again, another finger: ${again.bytes} bytes in ${again.ms} ms)`);
    expect(report.status).toBe(200);
    expect(report.bytes).toBeLessThan(1_000_000);

    const page = await editor.newPage();
    await page.goto(`${baseUrl()}/sheets/${sheetId}/report`, { waitUntil: 'networkidle' });
    const fingers = page.getByRole('navigation', { name: 'Derivation by finger' });
    expect(await fingers.getByRole('link').count()).toBe(7);
    expect(await page.locator('[data-derivation^="finger.0."]').count()).toBeGreaterThan(0);
    expect(await page.locator('[data-derivation^="finger.1."]').count()).toBe(0);
    await fingers.getByRole('link', { name: 'finger-3' }).click();
    await page.waitForURL(/derivation=3/);
    expect(await page.locator('[data-derivation^="finger.3."]').count()).toBeGreaterThan(0);
    expect(await page.locator('[data-derivation^="finger.0."]').count()).toBe(0);
    await saveScreenshot(page, 'report-largest-finger-3');
    await page.close();
  });
});
