import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { copyDemoSheet } from './demo-copy';
import { baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const DEMO_SHEET = 'Bearing housing: index a quarter turn';

let browser: Browser;
let page: Page;
let sheetId = '';
const created: string[] = [];

/** A copy of the three-finger demo sheet with a three-target matrix in two groups; a copy, because other browser tests read the demo sheets. */
beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1600, height: 1000 } });
  page = await context.newPage();
  await signIn(page, EDITOR.email, EDITOR.password);
  sheetId = await copyDemoSheet(page, DEMO_SHEET, 'Matrix check (copy of the bearing housing)', (document) => {
    // Runs go on past a singular tick, so a long generated matrix takes long enough to be cancelled.
    document.motion.run.stopOnSingular = false;
    document.matrix = {
      targets: [
        { orientation: { axis: [0, 0, 1], angle: '30 deg' }, group: 'vertical axis' },
        { orientation: { axis: [0, 0, 1], angle: '-30 deg' }, group: 'vertical axis' },
        { orientation: { axis: [1, 0, 0], angle: '20 deg' }, group: 'horizontal axis' },
      ],
    };
  });
  created.push(sheetId);
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await deleteCreatedSheets(created);
});

describe('the matrix panel', () => {
  it('runs the sheet matrix in a worker and shows one row per run and each group with its mean', async () => {
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const panel = page.getByTestId('matrix-panel');
    await panel.waitFor({ timeout: 30_000 });
    await panel.getByRole('button', { name: 'Run matrix' }).click();
    await panel.getByTestId('matrix-results').waitFor({ timeout: 60_000 });
    expect(await panel.getByTestId('matrix-runs').locator('tbody tr').count()).toBe(3);
    const groups = await panel.getByTestId('matrix-groups').locator('tbody tr td:first-child').allInnerTexts();
    expect(groups).toEqual(['vertical axis', 'horizontal axis']);
    // A turn of +30 deg and -30 deg about the vertical axis is the same task mirrored, so both runs take the same ticks (mirror symmetry of the hand, from the demo's layout).
    const ticks = await panel.getByTestId('matrix-runs').locator('tbody tr td:nth-child(7)').allInnerTexts();
    expect(ticks[0]).toBe(ticks[1]);
    await saveScreenshot(page, 'matrix-results');
  }, 120_000);

  it('shows progress over a long generated matrix and stops it on cancel', async () => {
    const panel = page.getByTestId('matrix-panel');
    await panel.getByLabel('Random rotations (count)').fill('300');
    await panel.getByRole('button', { name: 'Run matrix' }).click();
    const bar = panel.getByRole('progressbar');
    await bar.waitFor();
    await page.waitForFunction(() => Number(document.querySelector('[data-testid="matrix-panel"] [role="progressbar"]')?.getAttribute('aria-valuenow') ?? 0) >= 2, null, { timeout: 60_000 });
    await panel.getByRole('button', { name: 'Cancel' }).click();
    await panel.getByTestId('job-cancelled').waitFor();
    expect(await panel.getByTestId('job-cancelled').innerText()).toMatch(/Cancelled after \d+ of 303 runs/);
    await saveScreenshot(page, 'matrix-cancelled');
  }, 120_000);

  it('computes the saved revision on the server and shows the stored groups', async () => {
    const panel = page.getByTestId('matrix-panel');
    await panel.getByRole('button', { name: 'Compute and store for rev 1' }).click();
    await panel.getByTestId('matrix-stored-groups').waitFor({ timeout: 60_000 });
    const groups = await panel.getByTestId('matrix-stored-groups').locator('tbody tr td:first-child').allInnerTexts();
    expect(groups).toEqual(['vertical axis', 'horizontal axis']);
    const stored = await (await page.request.get(`${baseUrl()}/api/sheets/${sheetId}/revisions/1/matrix`)).json();
    expect(stored.result.runs.length).toBe(3);
    await saveScreenshot(page, 'matrix-stored');
  }, 120_000);
});
