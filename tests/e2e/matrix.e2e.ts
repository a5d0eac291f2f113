import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { copyDemoSheet } from './demo-copy';
import { baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const DEMO_SHEET = 'Bearing housing: index a quarter turn';

let browser: Browser;
let page: Page;
let sheetId = '';
let bareSheetId = '';
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
  bareSheetId = await copyDemoSheet(page, DEMO_SHEET, 'Matrix editing check (copy of the bearing housing)', (document) => {
    delete document.matrix;
  });
  created.push(bareSheetId);
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

describe('the matrix inputs of the editor', () => {
  it('adds a matrix to a sheet without one, two targets in degrees, and runs them as two rows', async () => {
    await page.goto(`${baseUrl()}/sheets/${bareSheetId}`, { waitUntil: 'networkidle' });
    const fields = page.getByTestId('matrix-fields');
    await fields.getByRole('button', { name: 'Add a test matrix' }).click();
    // An empty matrix is refused at its targets table until something is in it.
    await fields.getByText('a matrix needs at least one target').waitFor();
    await fields.getByRole('button', { name: 'Add target' }).click();
    await fields.getByRole('button', { name: 'Add target' }).click();
    expect(await fields.getByTestId('matrix-target-row').count()).toBe(2);
    await fields.getByLabel('target 1 angle').fill('30 deg');
    await fields.getByLabel('target 2 axis x').fill('1');
    await fields.getByLabel('target 2 axis z').fill('0');
    await fields.getByLabel('target 2 angle').fill('20 deg');
    await fields.getByLabel('target 2 group').fill('horizontal axis');
    const panel = page.getByTestId('matrix-panel');
    await panel.getByText("The sheet's matrix: 2 listed targets").waitFor({ timeout: 30_000 });
    // The panel opened on a sheet without a matrix and offered generated targets; none for this run.
    await panel.getByLabel('Spread axes (count)').fill('0');
    await panel.getByLabel('Random rotations (count)').fill('0');
    await panel.getByRole('button', { name: 'Run matrix' }).click();
    await panel.getByTestId('matrix-results').waitFor({ timeout: 60_000 });
    expect(await panel.getByTestId('matrix-runs').locator('tbody tr').count()).toBe(2);
    const groups = await panel.getByTestId('matrix-runs').locator('tbody tr td:nth-child(2)').allInnerTexts();
    // A target without a group counts toward "targets" (the sheet format's default group).
    expect(groups).toEqual(['targets', 'horizontal axis']);
    // 30 deg about z is the quaternion (cos 15 deg, 0, 0, sin 15 deg) = (0.966, 0, 0, 0.259) (axis-angle to quaternion, common practice).
    const target = await panel.getByTestId('matrix-runs').locator('tbody tr').first().locator('td:nth-child(4)').innerText();
    expect(target).toBe([Math.cos(Math.PI / 12), 0, 0, Math.sin(Math.PI / 12)].map((v) => v.toFixed(3)).join(', '));
    await saveScreenshot(page, 'matrix-edited');
  }, 120_000);

  it('keeps the panel generators in the sheet as a generator row', async () => {
    const panel = page.getByTestId('matrix-panel');
    const fields = page.getByTestId('matrix-fields');
    expect(await fields.getByTestId('matrix-generator-row').count()).toBe(0);
    await panel.getByLabel('Spread axes (count)').fill('4');
    await panel.getByLabel('Turn about each (deg)').fill('45');
    await panel.getByRole('button', { name: 'Keep in the sheet' }).click();
    await fields.getByTestId('matrix-generator-row').first().waitFor();
    expect(await fields.getByTestId('matrix-generator-row').count()).toBe(1);
    expect(await fields.getByLabel('turn about each axis').inputValue()).toBe('45 deg');
    expect(await fields.getByLabel('count').inputValue()).toBe('4');
    await panel.getByText('4 generated').waitFor({ timeout: 30_000 });
    expect(await panel.getByLabel('Spread axes (count)').inputValue()).toBe('0');
  }, 60_000);
});
