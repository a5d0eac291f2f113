import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, SCREENSHOT_DIR, signIn, shownText } from './browser';
import { SAFETY_CAUTION } from '../../src/lib/safety';
import type { DisplayUnits } from '../../src/lib/sheet/display-units';
import { evaluateSheet } from '../../src/lib/sheet/evaluate';
import { displayValue, findOutput } from '../../src/lib/sheet/outputs';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const SHEET_FILE = new URL('../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url);
const CHOSEN: DisplayUnits = { length: 'm', angle: 'deg', angularSpeed: 'rpm' };
const RADIUS = 'hand.fingers[0].roller.radius';

type Doc = { title: string; hand: { fingers: { joints: Record<string, unknown>[] }[] } };

let browser: Browser;
let page: Page;
let sheetId = '';
const created: string[] = [];
// Its own copy of the example with a small rate limit on every roll joint, so each finger raises a rate-limit warning.
const sheet = JSON.parse(readFileSync(SHEET_FILE, 'utf8')) as Doc;
for (const finger of sheet.hand.fingers) finger.joints[2].rateLimit = '0.001 rad/s';
const evaluated = evaluateSheet(sheet);
if (!evaluated.ok) throw new Error(evaluated.error.message);
const { result } = evaluated.value;

const field = (p: Page, path: string) => p.locator(`[data-quantity="${path}"]`);
const cell = (p: Page, key: string) => p.locator(`[data-result="${key}"]`).first();

async function waitForText(p: Page, selector: string, text: string): Promise<void> {
  await p.waitForFunction(([s, t]) => document.querySelector(s)?.textContent?.trim() === t, [selector, text] as const, { timeout: 10_000 });
}

beforeAll(async () => {
  browser = await launchBrowser();
  page = await (await browser.newContext({ viewport: { width: 1280, height: 1000 }, acceptDownloads: true })).newPage();
  await signIn(page, EDITOR.email, EDITOR.password);
  const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
  const answer = await page.request.post(`${baseUrl()}/api/sheets`, { data: { teamId: me.currentTeam, title: `${sheet.title} (units check)`, document: sheet } });
  expect(answer.status()).toBe(201);
  sheetId = (await answer.json()).sheetId;
  created.push(sheetId);
  await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
  await cell(page, '0.full.rates.2').waitFor();
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await deleteCreatedSheets(created);
});

describe('display units, warnings with their numbers, the safety label', () => {
  it('switches the units: results and derivation follow', async () => {
    const rates = findOutput('full.rates');
    const gap = findOutput('contact.gap');
    await expect(shownText(cell(page, '0.full.rates.2'))).resolves.toBe(displayValue(rates, result.fingers[0].full.rates[2]));
    await page.locator('[data-display-unit="angularSpeed"]').selectOption('rpm');
    await page.locator('[data-display-unit="length"]').selectOption('m');
    // 1 rpm = 2π/60 rad/s (ISO 80000-3); the expected text comes from the catalogue with the same choice.
    await waitForText(page, '[data-result="0.full.rates.2"]', displayValue(rates, result.fingers[0].full.rates[2], CHOSEN));
    await waitForText(page, '[data-result="0.contact.gap"]', displayValue(gap, result.fingers[0].contact.gap, CHOSEN));
    const derivationValue = page.locator('[data-derivation="finger.0.contact.gap"] [data-derivation-value]');
    // The derivation (and KaTeX) load once its section nears the screen.
    await page.locator('#derivation').scrollIntoViewIfNeeded();
    await derivationValue.waitFor({ timeout: 20_000 });
    await expect(shownText(derivationValue)).resolves.toMatch(/ m$/);
    await page.locator('#results').scrollIntoViewIfNeeded();
    await saveScreenshot(page, 'display-units-results-m-rpm');
  });

  it('shows a warning note with its value, threshold, finger and joint', async () => {
    const note = page.locator('[data-margin="motion"] [data-warning="RATE_LIMIT_EXCEEDED"]').first();
    await note.waitFor();
    await expect(shownText(note.locator('[data-warning-where]'))).resolves.toBe('finger "north", joint "north-roll"');
    await expect(shownText(note.locator('[data-warning-value]'))).resolves.toMatch(/^[\d.]+ rpm$/);
    // 0.001 rad/s × 60/(2π) = 0.009549 rpm.
    await expect(shownText(note.locator('[data-warning-threshold]'))).resolves.toBe('0.009549 rpm');
    mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await note.screenshot({ path: join(SCREENSHOT_DIR, 'display-units-warning-note.png') });
  });

  it('reads a bare number as metres, prominently, and notes an implausible roller radius', async () => {
    const radius = field(page, RADIUS);
    const input = radius.locator('input');
    const written = await input.inputValue();
    await input.fill('85');
    await expect(shownText(radius.locator('[data-reading="bare"]'))).resolves.toContain('reads as');
    await expect(shownText(radius.locator('[data-si]'))).resolves.toBe('85 m');
    await expect(shownText(radius.locator('[data-input-note]'))).resolves.toContain('did you mean 85 mm?');
    await radius.screenshot({ path: join(SCREENSHOT_DIR, 'display-units-bare-number.png') });
    await input.fill(written);
    expect(await radius.locator('[data-input-note]').count()).toBe(0);
  });

  it('keeps the hints of an x/y/z row apart and tabs field to field through a hand', async () => {
    const row = ['hand.fingers[0].roller.center[0]', 'hand.fingers[0].roller.center[1]', 'hand.fingers[0].roller.center[2]'];
    await page.locator('[data-display-unit="length"]').selectOption('mm');
    for (let k = 0; k < 2; k++) {
      const left = await field(page, row[k]).locator('[id$="-value"]').boundingBox();
      const right = await field(page, row[k + 1]).boundingBox();
      expect(left && right && left.x + left.width <= right.x + 0.5, `${row[k]} hint stays in its column`).toBe(true);
    }
    await page.locator('[data-finger="0"] .bg-paper-deep\\/40').first().screenshot({ path: join(SCREENSHOT_DIR, 'display-units-roller-row.png') });
    // Every Tab moves to the next field: no unit picker between them.
    await field(page, RADIUS).locator('input').focus();
    const stops: string[] = [];
    for (let k = 0; k < 16; k++) {
      await page.keyboard.press('Tab');
      stops.push(await page.evaluate(() => {
        const active = document.activeElement as HTMLElement | null;
        return active?.closest('[data-quantity]')?.getAttribute('data-quantity') ?? `${active?.tagName.toLowerCase()}:${active?.textContent?.trim().slice(0, 20) ?? ''}`;
      }));
    }
    expect(stops.slice(0, 3)).toEqual(row);
    // After the roller comes the first joint's row (name, role, axis, point, angle): one stop per field.
    expect(stops.filter((s) => s.startsWith('select:')).length).toBeLessThanOrEqual(1);
    expect(stops).toContain('hand.fingers[0].joints[0].angle');
    await page.locator('[data-display-unit="length"]').selectOption('m');
  });

  it('the run chart carries the labelled safety caution', async () => {
    const panel = page.getByTestId('run-panel');
    await panel.scrollIntoViewIfNeeded();
    await panel.getByRole('button', { name: /^Run( again)?$/ }).click();
    const caution = panel.locator('[data-testid="run-results"] [data-safety-caution]');
    await caution.waitFor({ timeout: 30_000 });
    await expect(shownText(caution.locator('[data-safety-label]'))).resolves.toMatch(/^safety$/i);
    // The charts follow the choice made above (rpm, m; angles left in degrees); uPlot draws axis labels on its canvas, so the figure names its y unit.
    const chart = (title: string | RegExp) => panel.locator('[data-testid="line-chart"]').filter({ has: page.locator('figcaption', { hasText: title }) });
    await expect(chart(/^Joint rates followed/).getAttribute('data-y-label')).resolves.toBe('rpm');
    await expect(chart('Position error').getAttribute('data-y-label')).resolves.toBe('m');
    await expect(chart('Joint angles').getAttribute('data-y-label')).resolves.toBe('deg');
    await panel.screenshot({ path: join(SCREENSHOT_DIR, 'display-units-run-safety.png') });
  });

  it('sweeps in the chosen units: the From/To fields and the x axis read rpm and m, while the sweep itself stays SI', async () => {
    const panel = page.getByTestId('sweep-panel');
    await panel.scrollIntoViewIfNeeded();
    await panel.locator('select[name="sweepPath"]').selectOption('/object/twist/angular/2');
    // The default range is the value ± 0.5 rad/s, shown in rpm: 1 rpm = 2π/60 rad/s (ISO 80000-3).
    const omega = evaluated.value.doc.object.twist.angular[2];
    const rpm = (radPerSecond: number) => String(Number(((radPerSecond * 60) / (2 * Math.PI)).toPrecision(6)));
    await expect(panel.getByLabel('From (rpm)').inputValue()).resolves.toBe(rpm(omega - 0.5));
    await expect(panel.getByLabel('To (rpm)').inputValue()).resolves.toBe(rpm(omega + 0.5));
    await panel.getByLabel('Steps').fill('5');
    await panel.getByRole('button', { name: 'Sweep' }).click();
    await panel.getByTestId('sweep-results').waitFor({ timeout: 30_000 });
    const chart = panel.locator('[data-testid="line-chart"]').first();
    await expect(chart.getAttribute('data-x-label')).resolves.toBe('Object angular velocity z (rpm)');
    await panel.screenshot({ path: join(SCREENSHOT_DIR, 'display-units-sweep-rpm.png') });
    await panel.locator('select[name="sweepPath"]').selectOption('/hand/fingers/0/roller/radius');
    const radius = evaluated.value.doc.hand.fingers[0].roller.radius;
    await expect(panel.getByLabel('From (m)').inputValue()).resolves.toBe(String(Number((0.75 * radius).toPrecision(6))));
  });

  it('saves the choice; the report follows it and its CSV download opens with the safety line', async () => {
    await page.getByLabel('revision message').fill('Show lengths in m and joint rates in rpm');
    await page.getByRole('button', { name: 'Save revision' }).click();
    await page.waitForFunction(() => document.querySelector('[data-revision]')?.textContent === '2');
    await page.goto(`${baseUrl()}/sheets/${sheetId}/report`, { waitUntil: 'networkidle' });
    const units = await page.locator('[data-testid="result-table"] td.num.text-xs').allInnerTexts();
    expect(units).toContain('rpm');
    expect(units).toContain('m');
    expect(units).not.toContain('rad/s');
    const warning = page.locator('[data-warning="RATE_LIMIT_EXCEEDED"]').first();
    await expect(warning.locator('[data-warning-threshold]').innerText()).resolves.toBe('0.009549 rpm');
    await expect(warning.locator('[data-warning-where]').innerText()).resolves.toContain('finger "north", joint "north-roll"');
    await expect(page.locator('[data-derivation="finger.0.contact.gap"] [data-derivation-value]').innerText()).resolves.toMatch(/ m$/);
    await expect(page.getByTestId('safety-caution').locator('[data-safety-label]').innerText()).resolves.toMatch(/^safety$/i);
    await saveScreenshot(page, 'display-units-report');
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Results (CSV)' }).click()]);
    const text = readFileSync((await download.path())!, 'utf8');
    const [first, header] = text.split('\n');
    expect(first).toBe(`# ${SAFETY_CAUTION}`);
    // The export stays SI, each column named with its unit.
    expect(header.split(',')).toContain('gap_m');
  });

  it('opens the compare page without a query on the last two revisions, with the units change among the differences', async () => {
    const response = await page.goto(`${baseUrl()}/sheets/${sheetId}/compare`, { waitUntil: 'networkidle' });
    expect(response?.status()).toBe(200);
    const text = await page.locator('main').innerText();
    expect(text).not.toContain('Choose two revisions');
    expect(text).toContain('rpm');
    await saveScreenshot(page, 'display-units-compare-default');
  });
});
