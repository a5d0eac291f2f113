import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { mkdirSync, readFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { join } from 'node:path';
import { baseUrl, launchBrowser, saveScreenshot, SCREENSHOT_DIR, signIn, shownText } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const THREE_FINGER_SHEET = 'Bearing housing: index a quarter turn';
const RADIUS = 'hand.fingers[0].roller.radius';

let browser: Browser;
let context: BrowserContext;
let page: Page;
let sheetId = '';

const field = (p: Page, path: string) => p.locator(`[data-quantity="${path}"]`);
const cell = (p: Page, key: string) => p.locator(`[data-result="${key}"]`).first();

/** Waits until the results cell shows something other than `before`; returns the new text. */
async function changedText(p: Page, key: string, before: string): Promise<string> {
  await p.waitForFunction(([k, b]) => document.querySelector(`[data-result="${k}"]`)?.textContent !== b, [key, before] as const, { timeout: 10_000 });
  return (await cell(p, key).textContent()) ?? '';
}

/** A viewport-sized picture of one part of the page, for looking at details. */
async function saveSection(p: Page, selector: string, name: string): Promise<void> {
  await p.locator(selector).first().scrollIntoViewIfNeeded();
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await p.screenshot({ path: join(SCREENSHOT_DIR, `${name}.png`) });
}

/** Picture of the scene view (3D canvas or the SVG fallback views) as bytes. */
async function sceneImage(p: Page): Promise<Buffer> {
  return p.locator('[data-testid="scene-view"]').screenshot();
}

beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1600, height: 1000 } });
  page = await context.newPage();
  await signIn(page, EDITOR.email, EDITOR.password);
  const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
  const teamId = me.currentTeam;
  const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${teamId}&q=${encodeURIComponent('Bearing housing')}`)).json();
  sheetId = list.items.find((s: { title: string }) => s.title === THREE_FINGER_SHEET).id;
}, 60_000);

afterAll(async () => {
  await browser?.close();
});

describe('sheet editor', () => {
  it('opens a demo sheet with its title block, results and view', async () => {
    const scripts = new Set<string>();
    page.on('response', (response) => {
      const url = new URL(response.url());
      if (url.pathname.endsWith('.js')) scripts.add(url.pathname);
    });
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    await expect(shownText(page.locator('[data-sheet-title]'))).resolves.toBe(THREE_FINGER_SHEET);
    await cell(page, '0.contact.gap').waitFor();
    await page.locator('[data-testid="scene-view"]').waitFor();
    expect(await page.locator('[data-safety-caution]').count()).toBeGreaterThan(0);
    await saveScreenshot(page, 'sheet-editor-open');
    await saveSection(page, '[data-title-block]', 'sheet-editor-open-top');
    // JavaScript this page loaded (islands, lazy 3D view, workers), gzipped as a server would send it.
    const sizes = [...scripts].map((path) => {
      const bytes = new Uint8Array(readFileSync(join('dist/client', path)));
      return { path, raw: bytes.length, gzip: gzipSync(bytes, { level: 9 }).length };
    });
    const total = sizes.reduce((sum, s) => sum + s.gzip, 0);
    const largest = [...sizes].sort((a, b) => b.gzip - a.gzip).slice(0, 6).map((s) => `${s.path.split('/').pop()} ${(s.gzip / 1024).toFixed(0)} kB`);
    console.log(`sheet page JavaScript: ${sizes.length} files, ${(total / 1024).toFixed(0)} kB gzipped (${(sizes.reduce((sum, s) => sum + s.raw, 0) / 1024).toFixed(0)} kB raw); largest: ${largest.join(', ')}`);
    expect(total).toBeGreaterThan(0);
  });

  it('flags a wrong dimension next to the field at once', async () => {
    const radius = field(page, RADIUS);
    await radius.locator('input').fill('16 deg');
    await expect(shownText(radius.getByRole('alert'))).resolves.toContain('expected a length');
  });

  it('changes the roller radius with units; the results and the view update', async () => {
    const gapBefore = await shownText(cell(page, '0.contact.gap'));
    await page.waitForTimeout(500);
    const viewBefore = await sceneImage(page);
    const radius = field(page, RADIUS);
    await radius.locator('input').fill('16 mm');
    await expect(shownText(radius.locator('[data-si]'))).resolves.toBe('0.016 m');
    const gapAfter = await changedText(page, '0.contact.gap', gapBefore);
    // The roller centre stays put, so 4 mm more radius closes the gap by 4 mm.
    expect(Number(gapAfter) - Number(gapBefore)).toBeCloseTo(-4, 3);
    await expect.poll(async () => (await sceneImage(page)).toString('base64')).not.toBe(viewBefore.toString('base64'));
    await saveScreenshot(page, 'sheet-editor-radius-16mm');
    await saveSection(page, '#results', 'sheet-editor-results');
  });

  it('takes the object acceleration beside the twist; the feed-forward adds it at every contact', async () => {
    const key = '0.acceleration.objectPoint';
    const before = await shownText(cell(page, key));
    const x = (text: string) => Number(text.replace(/[()]/g, '').split(',')[0]);
    const linear = field(page, 'object.acceleration.linear[0]');
    await linear.locator('input').fill('1 m/s^2');
    await expect(shownText(linear.locator('[data-si]'))).resolves.toBe('1 m/s^2');
    const after = await changedText(page, key, before);
    // a(x) = a_o + alpha x r + omega x (omega x r): the origin's acceleration adds one to one (Craig, ch. 6).
    expect(x(after) - x(before)).toBeCloseTo(1, 3);
    await saveSection(page, '[data-acceleration="0"]', 'sheet-editor-acceleration');
    // The table names the contact model the feed-forward used, in its caption and its first row.
    const model = await shownText(cell(page, '0.acceleration.model'));
    const caption = (await shownText(page.locator('[data-acceleration="0"] caption'))).toLowerCase();
    expect(caption).toContain(model === 'rolling-contact' ? 'rolling contact' : 'material points');
    // Beside it the steer-and-roll feed-forward: its pivot rate and base and roll accelerations, or the reason it is not defined.
    const steer = await shownText(cell(page, '0.acceleration.steer.status'));
    if (steer === 'defined') {
      expect(Number.isFinite(Number(await shownText(cell(page, '0.acceleration.steer.pivotRate'))))).toBe(true);
      expect(Number.isFinite(Number(await shownText(cell(page, '0.acceleration.steer.rollAcceleration'))))).toBe(true);
    } else {
      await expect(shownText(cell(page, '0.acceleration.steer.reason'))).resolves.toContain('not defined');
    }
    await linear.locator('input').fill('');
    await changedText(page, key, after);
    await expect(shownText(cell(page, key))).resolves.toBe(before);
  });

  it('uses a variable from the variables editor in a field, and shows a bad line inline', async () => {
    const editor = page.locator('[data-variables-editor]');
    await editor.click();
    await page.keyboard.type('rollerRadius = 15 mm\nbroken = 3 furlongz');
    await page.locator('.cm-variable-value').first().waitFor();
    await expect(shownText(page.locator('.cm-variable-value').first())).resolves.toContain('0.015 m');
    await expect(shownText(page.locator('.cm-variable-error').first())).resolves.toContain('unknown name "furlongz"');
    const gapBefore = await shownText(cell(page, '0.contact.gap'));
    await field(page, RADIUS).locator('input').fill('rollerRadius + 1 mm');
    await expect(shownText(field(page, RADIUS).locator('[data-si]'))).resolves.toBe('0.016 m');
    await field(page, 'hand.fingers[1].roller.radius').locator('input').fill('rollerRadius');
    await changedText(page, '1.contact.gap', await shownText(cell(page, '1.contact.gap'))).catch(() => undefined);
    expect(await shownText(cell(page, '0.contact.gap'))).toBe(gapBefore);
    // Remove the broken line so the sheet reads cleanly for saving.
    await editor.click();
    await page.keyboard.press('Control+End');
    await page.keyboard.down('Shift');
    await page.keyboard.press('Home');
    await page.keyboard.up('Shift');
    await page.keyboard.press('Backspace');
    await page.keyboard.press('Backspace');
    await page.waitForFunction(() => document.querySelectorAll('.cm-variable-error').length === 0);
    await saveSection(page, '#variables', 'sheet-editor-variables');
  });

  it('shows a derivation with the numbers put in', async () => {
    const derivation = page.locator('#derivation');
    await derivation.scrollIntoViewIfNeeded();
    await derivation.locator('[data-derivation="finger.0.contact.gap"] .katex').waitFor();
    expect(await derivation.locator('.katex').count()).toBeGreaterThan(5);
    await saveSection(page, '#derivation', 'sheet-editor-derivation');
  });

  it('measures keystroke-to-result times', async () => {
    const input = field(page, 'hand.fingers[2].roller.radius').locator('input');
    /** Median time from the input event to the results table showing the new numbers, over several edits. */
    async function medianUpdate(): Promise<{ median: number; times: number[]; computeMs: number[] }> {
      await page.evaluate(() => performance.clearMeasures('slipless:edit-to-result'));
      const computeMs: number[] = [];
      for (const value of ['13.5 mm', '13 mm', '12.5 mm', '13 mm', '12 mm', '12.5 mm', '13 mm', '13.5 mm', '12.5 mm']) {
        const before = (await cell(page, '2.contact.gap').textContent()) ?? '';
        await input.fill(value);
        await changedText(page, '2.contact.gap', before);
        computeMs.push(Number(await page.locator('[data-compute-ms]').textContent()));
        await page.waitForTimeout(400);
      }
      const times = await page.evaluate(() => performance.getEntriesByName('slipless:edit-to-result').map((m) => m.duration));
      const sorted = [...times].sort((a, b) => a - b);
      return { median: sorted[Math.floor(sorted.length / 2)], times, computeMs };
    }
    const shown = await medianUpdate();
    await page.getByRole('button', { name: 'Hide' }).click();
    const hidden = await medianUpdate();
    await page.getByRole('button', { name: 'Show' }).click();
    const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];
    console.log(
      `keystroke-to-result, three-finger sheet (no debounce): median ${shown.median.toFixed(0)} ms with the 3D view shown ` +
        `(${shown.times.map((t) => t.toFixed(0)).join(', ')}), ${hidden.median.toFixed(0)} ms with it hidden (${hidden.times.map((t) => t.toFixed(0)).join(', ')}); ` +
        `solve in the worker: median ${median([...shown.computeMs, ...hidden.computeMs]).toFixed(1)} ms`,
    );
    expect(shown.times.length).toBeGreaterThanOrEqual(5);
    expect(hidden.median).toBeLessThan(1000);
  });

  it('saves with a message', async () => {
    const before = Number(await shownText(page.locator('[data-revision]')));
    await page.getByLabel('revision message').fill('Larger rollers on the first two fingers');
    await page.getByRole('button', { name: 'Save revision' }).click();
    await page.waitForFunction((n) => document.querySelector('[data-revision]')?.textContent === String(n), before + 1);
    await expect(shownText(page.locator('[data-save-status]'))).resolves.toContain('All changes saved');
    await saveScreenshot(page, 'sheet-editor-saved');
  });

  it('shows a conflict when someone saved in between, and re-applies on top', async () => {
    const other = await context.newPage();
    await other.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    await cell(other, '0.contact.gap').waitFor();
    // This page makes a change and saves first ...
    await field(other, 'hand.fingers[2].roller.radius').locator('input').fill('13 mm');
    await other.getByLabel('revision message').fill('Third roller 13 mm');
    const saved = Number(await shownText(other.locator('[data-revision]'))) + 1;
    await other.getByRole('button', { name: 'Save revision' }).click();
    await other.waitForFunction((n) => document.querySelector('[data-revision]')?.textContent === String(n), saved);
    await other.close();
    // ... so this one, still based on the revision before, gets the conflict panel.
    await field(page, 'object.pose.position[2]').locator('input').fill('80 mm');
    await page.getByLabel('revision message').fill('Lower the part');
    await page.getByRole('button', { name: 'Save revision' }).click();
    const conflict = page.locator('[data-conflict]');
    await conflict.waitFor();
    await conflict.locator('[data-changes="theirs"]').waitFor();
    await expect(shownText(conflict.locator('[data-changes="theirs"]'))).resolves.toContain('hand.fingers[2].roller.radius');
    await expect(shownText(conflict.locator('[data-changes="mine"]'))).resolves.toContain('object.pose.position[2]');
    await saveSection(page, '[data-conflict]', 'sheet-editor-conflict');
    await conflict.getByRole('button', { name: /Re-apply mine/ }).click();
    await page.waitForFunction((n) => document.querySelector('[data-revision]')?.textContent === String(n), saved + 1);
    expect(await field(page, 'hand.fingers[2].roller.radius').locator('input').inputValue()).toBe('13 mm');
    expect(await field(page, 'object.pose.position[2]').locator('input').inputValue()).toBe('80 mm');
  });

  it('forks, changes the fork and compares it with its origin', async () => {
    await page.getByRole('button', { name: 'Fork', exact: true }).click();
    await page.waitForURL((url) => url.pathname.startsWith('/sheets/') && !url.pathname.includes(sheetId));
    await page.locator('[data-forked-from]').waitFor();
    await cell(page, '0.contact.gap').waitFor();
    const before = await shownText(cell(page, '0.contact.gap'));
    await field(page, RADIUS).locator('input').fill('18 mm');
    await changedText(page, '0.contact.gap', before);
    await page.getByLabel('revision message').fill('Try 18 mm on the first roller');
    await page.getByRole('button', { name: 'Save revision' }).click();
    await page.waitForFunction(() => document.querySelector('[data-revision]')?.textContent === '2');
    await saveScreenshot(page, 'sheet-editor-fork');
    await page.getByRole('link', { name: 'Compare with origin' }).click();
    await page.waitForLoadState('networkidle');
    const changed = page.locator(`[data-testid="input-diff"] tr[data-path*="roller"][data-kind="changed"]`);
    expect(await changed.count()).toBeGreaterThan(0);
    expect(await page.locator('[data-testid="output-diff"] [data-kind="changed"]').count()).toBeGreaterThan(0);
    await saveScreenshot(page, 'sheet-editor-compare-fork');
  });

  it('is read-only for a viewer', async () => {
    const viewerContext = await browser.newContext({ viewport: { width: 1400, height: 900 } });
    const viewer = await viewerContext.newPage();
    await signIn(viewer, 'viewer@tarnwhistle.example', EDITOR.password);
    await viewer.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    await cell(viewer, '0.contact.gap').waitFor();
    expect(await field(viewer, RADIUS).locator('input').isDisabled()).toBe(true);
    expect(await viewer.getByRole('button', { name: 'Save revision' }).count()).toBe(0);
    await viewerContext.close();
  });
});
