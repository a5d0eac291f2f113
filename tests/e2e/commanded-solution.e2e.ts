import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { copyDemoSheet } from './demo-copy';
import { baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, SCREENSHOT_DIR, signIn, shownText } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const DEMO_SHEET = 'Bearing housing: index a quarter turn';

let browser: Browser;
let page: Page;
let sheetId = '';
const created: string[] = [];

const cell = (key: string) => page.locator(`[data-result="${key}"]`).first();

/**
 * A copy of the three-finger demo sheet with its first pivot turned off the steered angle, so that steering has a change
 * to command; a copy, because other browser tests read the demo sheets' revisions.
 */
beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1600, height: 1000 } });
  page = await context.newPage();
  await signIn(page, EDITOR.email, EDITOR.password);
  sheetId = await copyDemoSheet(page, DEMO_SHEET, 'Commanded solution check (copy of the bearing housing)', (document) => {
    document.hand.fingers[0].joints[1].angle = '10 deg';
  });
  created.push(sheetId);
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await deleteCreatedSheets(created);
});

async function runAndRead(): Promise<string> {
  const panel = page.getByTestId('run-panel');
  await panel.getByRole('button', { name: /^Run( again)?$/ }).click();
  await panel.getByTestId('run-results').waitFor();
  return shownText(panel.getByTestId('run-solution'));
}

async function sweepAndRead(): Promise<string> {
  const panel = page.getByTestId('sweep-panel');
  await panel.getByLabel('Steps').fill('5');
  await panel.getByRole('button', { name: 'Sweep' }).click();
  await panel.getByTestId('sweep-results').waitFor();
  return shownText(panel.getByTestId('sweep-solution'));
}

describe('the commanded solution', () => {
  it('commands steer-and-roll by default: the pivot reads as a target angle, a change and the rate over the time step', async () => {
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const banner = page.getByTestId('commanded-solution');
    await banner.waitFor();
    expect(await banner.getAttribute('data-solution')).toBe('steer-and-roll');
    expect(await shownText(banner)).toMatch(/Commanded to the controller: steer-and-roll.*time step of 5 ms/s);
    expect(await page.getByTestId('commanded-choice').inputValue()).toBe('steer-and-roll');
    expect(await shownText(cell('0.commanded.solution'))).toBe('steer-and-roll');
    // The pivot starts at 10° and steers back: a change of some degrees, whose rate over 5 ms is far from the 0 rad/s the steer-and-roll rates give it.
    const change = Number(await shownText(cell('0.commanded.pivot.change')));
    const rate = Number(await shownText(cell('0.commanded.pivot.rate')));
    expect(Math.abs(change)).toBeGreaterThan(1);
    // rate = change / time step (common practice: a backward difference), change shown in degrees, to the 4 digits shown.
    expect(rate).toBeCloseTo(((change * Math.PI) / 180) / 0.005, -1);
    expect(Number(await shownText(cell('0.commanded.rates.1')))).toBe(rate);
    expect(await runAndRead()).toContain('steer-and-roll');
    expect(await sweepAndRead()).toContain('steer-and-roll');
    await saveScreenshot(page, 'commanded-steer-and-roll');
    mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await page.locator('#results').screenshot({ path: join(SCREENSHOT_DIR, 'commanded-steer-and-roll-results.png') });
  });

  it('states the frame of every vector on the page', async () => {
    const results = page.locator('#results');
    for (const label of ['contact point x (palm frame)', 'normal n (palm frame)', 'tangential velocity (palm frame)']) {
      expect(await results.locator('th', { hasText: label }).count()).toBeGreaterThan(0);
    }
    expect(await shownText(page.getByTestId('commanded-solution'))).toContain('Every vector is in the palm frame');
    for (const legend of ['twist: origin velocity (palm frame)', 'twist: angular velocity (palm frame)', 'target position (palm frame)']) {
      expect(await page.locator('legend', { hasText: legend }).count()).toBe(1);
    }
    await page.getByTestId('twist-frame').selectOption('object');
    await page.locator('legend', { hasText: 'twist: angular velocity (object frame)' }).waitFor();
    await page.locator('#motion').screenshot({ path: join(SCREENSHOT_DIR, 'commanded-motion-object-frame.png') });
    // Written about a finger's contact: the sheet finds the contact, then converts, and the derivation shows it.
    await page.getByTestId('twist-reference').selectOption('the contact of north');
    await page.locator('legend', { hasText: 'twist: velocity of the contact point (object frame)' }).waitFor();
    // The derivation loads once its section nears the screen.
    await page.locator('#derivation').scrollIntoViewIfNeeded();
    const scope = page.getByTestId('derivation-scope');
    await scope.locator('option[value="object"]').waitFor({ state: 'attached', timeout: 20_000 });
    await scope.selectOption('object');
    await page.locator('[data-derivation="object.twist"]', { hasText: 'the contact of finger "north"' }).waitFor({ timeout: 20_000 });
    await page.locator('[data-derivation="object.twist"]').screenshot({ path: join(SCREENSHOT_DIR, 'commanded-derivation-about-contact.png') });
    await page.locator('#motion').screenshot({ path: join(SCREENSHOT_DIR, 'commanded-motion-about-contact.png') });
    await page.getByTestId('twist-reference').selectOption('the object origin');
    await page.getByTestId('twist-frame').selectOption('palm');
  });

  it('follows "full" in the results, the run, the sweep and the CSV export once chosen, and says so', async () => {
    await page.getByTestId('commanded-choice').selectOption('full');
    await page.locator('[data-testid="commanded-solution"][data-solution="full"]').waitFor();
    expect(await shownText(cell('0.commanded.solution'))).toBe('full');
    expect(await page.locator('[data-result="0.commanded.pivot.rate"]').count()).toBe(0);
    for (let k = 0; k < 3; k++) expect(await shownText(cell(`0.commanded.rates.${k}`))).toBe(await shownText(cell(`0.full.rates.${k}`)));
    expect(await runAndRead()).toContain('full solution');
    expect(await sweepAndRead()).toContain('full solution');
    expect(await page.getByTestId('sweep-panel').locator('figcaption', { hasText: 'Commanded joint rates: full solution' }).count()).toBe(1);
    await page.getByLabel('revision message').fill('Command the full solution');
    await page.getByRole('button', { name: 'Save revision' }).click();
    await page.waitForFunction(() => document.querySelector('[data-revision]')?.textContent === '2');
    const csv = await (await page.request.get(`${baseUrl()}/api/sheets/${sheetId}/export?format=csv`)).text();
    // The file opens with the safety caution as a comment line.
    const [header, ...rows] = csv.trimEnd().split('\n').filter((line) => !line.startsWith('#')).map((line) => line.split(','));
    const solution = header!.indexOf('commanded_solution');
    expect(solution).toBeGreaterThan(0);
    expect(rows.map((row) => row[solution])).toEqual(rows.map(() => 'full'));
    expect(header).toEqual(expect.arrayContaining(['commanded_rate1_rad_s', 'full_rate1_rad_s', 'pivot_rate_rad_s']));
    expect(rows[0]![header!.indexOf('commanded_rate2_rad_s')]).toBe(rows[0]![header!.indexOf('full_rate2_rad_s')]);
    await saveScreenshot(page, 'commanded-full');
    await page.getByTestId('sweep-panel').screenshot({ path: join(SCREENSHOT_DIR, 'commanded-full-sweep.png') });
  });
});
