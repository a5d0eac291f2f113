import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { SEVERITY_LEVELS } from '../../src/lib/kinematics';
import { evaluateSheet } from '../../src/lib/sheet/evaluate';
import { createSheetFromTemplate } from '../../src/lib/sheet/templates';
import type { SheetDocument } from '../../src/lib/sheet/types';
import { baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const VIEWPORT = { width: 1600, height: 1000 };

let browser: Browser;
let page: Page;
let sheetId = '';
let doc: SheetDocument;

const field = (p: Page, path: string) => p.locator(`[data-quantity="${path}"]`);
const summaryRate = (p: Page, finger: number, joint: number) => p.locator(`[data-summary-rate="${finger}.${joint}"]`);
const shownNumber = (text: string) => Number(text.replace('−', '-'));

/** Waits until the element's text differs from `before`; returns the new text. */
async function changedText(p: Page, selector: string, before: string): Promise<string> {
  await p.waitForFunction(([s, b]) => document.querySelector(s)?.textContent !== b, [selector, before] as const, { timeout: 15_000 });
  return (await p.locator(selector).first().textContent()) ?? '';
}

beforeAll(async () => {
  browser = await launchBrowser();
  page = await browser.newPage({ viewport: VIEWPORT });
  await signIn(page, EDITOR.email, EDITOR.password);
  doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  doc.title = 'Browser test: reading a three-finger sheet';
  const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
  const response = await page.request.post(`${baseUrl()}/api/sheets`, {
    data: { teamId: me.currentTeam, title: doc.title, tags: ['browser-test'], document: doc, message: 'Created by the sheet reading browser test' },
  });
  expect(response.status()).toBe(201);
  sheetId = (await response.json()).sheetId;
  await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
  await summaryRate(page, 0, 0).waitFor();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  if (sheetId) await deleteCreatedSheets([sheetId]);
});

describe('reading a three-finger sheet', () => {
  it('opens the side column on a summary of the commanded rates and worst warning per finger', async () => {
    await saveScreenshot(page, 'sheet-reading-open');
    // Reference: the same document solved here in Node by the sheet pipeline, away from the page.
    const evaluated = evaluateSheet(doc);
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const { result } = evaluated.value;
    const summary = page.locator('[data-results-summary]');
    expect(await summary.locator('[data-summary-finger]').count()).toBe(3);
    for (const [i, finger] of result.fingers.entries()) {
      // The sheet commands steer-and-roll (its default) where the finger has it, the full solution otherwise; a steered
      // pivot is commanded its change over one time step of the run (issue #13).
      const roles = doc.hand.fingers[i]!.joints.map((joint) => joint.role);
      const rates = finger.steer.available
        ? Array.from(finger.steer.rates, (rate, k) => (roles[k] === 'pivot' ? finger.steer.pivotChange / doc.motion.run.dt : rate))
        : Array.from(finger.full.rates);
      const block = summary.locator(`[data-summary-finger="${i}"]`);
      expect(await block.locator('h3').innerText()).toContain(finger.steer.available ? 'steer-and-roll' : 'full');
      for (let k = 0; k < finger.jointNames.length; k++) {
        const shown = shownNumber(await summaryRate(page, i, k).innerText());
        // Four significant digits on screen.
        expect(Math.abs(shown - rates[k]!)).toBeLessThanOrEqual(5e-4 * Math.abs(rates[k]!) + 1e-9);
      }
      const raised = result.warnings.filter((w) => w.finger === i).map((w) => SEVERITY_LEVELS.indexOf(w.severity));
      const worst = raised.length === 0 ? 'none' : SEVERITY_LEVELS[Math.max(...raised)];
      expect(await block.locator('[data-summary-worst]').getAttribute('data-summary-worst')).toBe(worst);
    }
    // The summary sits above the 3D view in the side column and stays in view at the foot of the pad.
    const summaryBox = (await summary.boundingBox())!;
    const sceneBox = (await page.locator('[data-testid="scene-view"]').boundingBox())!;
    expect(summaryBox.y).toBeLessThan(sceneBox.y);
    await page.locator('#notes').scrollIntoViewIfNeeded();
    const pinned = (await summary.boundingBox())!;
    expect(pinned.y).toBeGreaterThanOrEqual(0);
    expect(pinned.y + 40).toBeLessThan(VIEWPORT.height);
    expect(await summary.locator('[data-safety-caution]').count()).toBe(1);
    await saveScreenshot(page, 'sheet-reading-summary-pinned');
  });

  it('updates the summary live when a roller changes', async () => {
    // The roll joint's rate follows the roller radius (rolling: the surface speeds match); the base rates here are zero.
    const selector = '[data-summary-rate="0.2"]';
    const before = (await page.locator(selector).textContent()) ?? '';
    await field(page, 'hand.fingers[0].roller.radius').locator('input').fill('15 mm');
    const after = await changedText(page, selector, before);
    expect(after).not.toBe(before);
  });

  it('edits the hand in a compact table per finger, with the fields and checks of before', async () => {
    const table = page.locator('[data-hand-table="0"]');
    expect(await table.locator('tbody tr').count()).toBe(doc.hand.fingers[0]!.joints.length);
    const heads = await table.locator('thead th').allInnerTexts();
    expect(heads.map((h) => h.split('\n')[0]!.toLowerCase())).toEqual(['joint', 'role', 'axis at home (unit)', 'point on the axis', 'angle', 'limits: lower, upper', 'rate limit']);
    // Three fingers used to take several screens of cards; the table keeps the hand within about two.
    const hand = (await page.locator('#hand').boundingBox())!;
    expect(hand.height).toBeLessThan(2 * VIEWPORT.height);
    // Each input keeps its full label: the base joint's angle is found by its name.
    const joint = doc.hand.fingers[0]!.joints[0]!;
    const angle = page.getByLabel(`${joint.name} angle`, { exact: true });
    await angle.fill('5 mm');
    const cell = field(page, 'hand.fingers[0].joints[0].angle');
    await expect(cell.getByRole('alert').innerText()).resolves.toContain('expected an angle');
    const before = (await page.locator('[data-summary-rate="0.2"]').textContent()) ?? '';
    await angle.fill('5 deg');
    await cell.getByRole('alert').waitFor({ state: 'detached' });
    // Turning the base joint moves the contact on the object, and the roll rate with it.
    await changedText(page, '[data-summary-rate="0.2"]', before);
    // The reading in SI shows under the cell being edited.
    await expect(cell.locator('[data-si]').innerText()).resolves.toBe('0.0872665 rad');
    await page.locator('#hand').scrollIntoViewIfNeeded();
    await saveScreenshot(page, 'sheet-reading-hand-table');
  });

  it('saves, runs and sweeps from the keyboard, wherever the focus is', async () => {
    const save = page.getByRole('button', { name: 'Save revision' });
    expect(await save.getAttribute('title')).toContain('Alt+Shift+S');
    expect(await page.getByTestId('run-panel').getByRole('button', { name: 'Run' }).getAttribute('title')).toContain('Alt+Shift+R');
    expect(await page.getByTestId('sweep-panel').getByRole('button', { name: 'Sweep' }).getAttribute('title')).toContain('Alt+Shift+W');

    // Save from inside a quantity field.
    const revision = Number(await page.locator('[data-revision]').innerText());
    await field(page, 'hand.fingers[1].roller.radius').locator('input').focus();
    await page.keyboard.press('Alt+Shift+S');
    await page.waitForFunction((n) => document.querySelector('[data-revision]')?.textContent === String(n), revision + 1);
    await expect(page.locator('[data-save-status]').innerText()).resolves.toContain('All changes saved');

    // Run from inside the variables editor: the key reaches the page, and the editor gets no stray character.
    const editor = page.locator('[data-variables-editor]');
    await editor.click();
    const written = await editor.innerText();
    await page.keyboard.press('Alt+Shift+R');
    const run = page.getByTestId('run-panel');
    await run.getByTestId('run-results').waitFor({ timeout: 60_000 });
    expect(await editor.innerText()).toBe(written);
    expect(await run.getByRole('img', { name: /^Joint rates followed: .* over time \(s\)$/ }).count()).toBe(1);

    // Sweep with the focus on the page body.
    await page.locator('body').focus();
    await page.keyboard.press('Alt+Shift+W');
    await page.getByTestId('sweep-panel').getByTestId('sweep-results').waitFor({ timeout: 60_000 });
  });

  it('names compare-page inputs as finger / joint / field', async () => {
    await page.goto(`${baseUrl()}/sheets/${sheetId}/compare?from=1&to=2`, { waitUntil: 'networkidle' });
    const finger = doc.hand.fingers[0]!;
    const radius = page.locator('[data-testid="input-diff"] tr[data-path="hand.fingers[0].roller.radius"]');
    expect(await radius.getAttribute('data-kind')).toBe('changed');
    expect(await radius.locator('[data-field-words]').innerText()).toBe(`finger 1 (${finger.name}) / roller radius`);
    const angle = page.locator('[data-testid="input-diff"] tr[data-path="hand.fingers[0].joints[0].angle"]');
    expect(await angle.locator('[data-field-words]').innerText()).toBe(`finger 1 (${finger.name}) / joint 1 (${finger.joints[0]!.name}) / angle`);
    expect(await page.locator('[data-testid="input-diff"]').innerText()).not.toContain('hand.fingers[');
    await saveScreenshot(page, 'sheet-reading-compare');
  });

  it('asks before replacing the hand: Escape and Cancel keep it, Replace hand replaces it', async () => {
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    await summaryRate(page, 0, 0).waitFor();
    const template = page.locator('#hand select').first();
    const options = await template.locator('option').allInnerTexts();
    await template.selectOption({ label: options.find((o) => o.includes('(2 fingers)'))! });
    const open = page.getByRole('button', { name: 'Replace hand…' });
    const dialog = page.getByRole('dialog', { name: 'Replace the whole hand?' });

    await open.click();
    await dialog.waitFor();
    // The focus starts on Cancel, so Enter alone changes nothing.
    expect(await page.evaluate(() => document.activeElement?.textContent)).toBe('Cancel');
    await page.keyboard.press('Escape');
    await dialog.waitFor({ state: 'hidden' });
    expect(await page.locator('[data-finger]').count()).toBe(3);

    await open.focus();
    await page.keyboard.press('Enter');
    await dialog.waitFor();
    await page.keyboard.press('Enter');
    await dialog.waitFor({ state: 'hidden' });
    expect(await page.locator('[data-finger]').count()).toBe(3);

    await open.click();
    await dialog.getByRole('button', { name: 'Replace hand' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.waitForFunction(() => document.querySelectorAll('[data-finger]').length === 2);
    // The summary follows once the worker has solved the new hand.
    await page.waitForFunction(() => document.querySelectorAll('[data-summary-finger]').length === 2, undefined, { timeout: 15_000 });
  });
});
