import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { createSheetFromTemplate } from '../../src/lib/sheet/templates';
import type { SheetDocument } from '../../src/lib/sheet/types';
import { baseUrl, launchBrowser, saveScreenshot, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const TIMED_TICKS = 2000;
// Long enough that even a fast machine takes several progress intervals over it: the bar's advance is what is tested.
const PROGRESS_TICKS = 200_000;
const LONG_TICKS = 1_000_000;

let browser: Browser;
let page: Page;
let timedSheetId: string;
let progressSheetId: string;
let longSheetId: string;

/**
 * A three-finger sheet whose run goes to its tick limit and does not stop on singular warnings:
 * tolerances of 1e-12 take about 2,700 ticks to meet, and with sensor noise they are never met.
 */
function sheetRunningFor(maxTicks: number, title: string, noisy = false): SheetDocument {
  const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  doc.title = title;
  doc.motion.run = { ...doc.motion.run, maxTicks, positionTolerance: 1e-12, angleTolerance: 1e-12, stopOnSingular: false };
  if (noisy) doc.motion.run.noise = { seed: 7, position: 1e-5, angle: 1e-4 };
  return doc;
}

async function createSheet(doc: SheetDocument): Promise<string> {
  const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
  const response = await page.request.post(`${baseUrl()}/api/sheets`, {
    data: { teamId: me.currentTeam, title: doc.title, tags: ['browser-test'], document: doc, message: 'Created by the scene and plot browser test' },
  });
  expect(response.status()).toBe(201);
  return (await response.json()).sheetId;
}

async function openSheet(target: Page, sheetId: string): Promise<void> {
  await target.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
  await target.getByTestId('scene-view').filter({ hasText: 'at the solved state' }).waitFor();
}

/** Pixels of a PNG that differ clearly from the paper background, and the number of distinct colours (16 levels per channel). */
async function pixelStats(target: Page, png: Buffer): Promise<{ inked: number; total: number; colours: number }> {
  return target.evaluate(async (base64) => {
    const bytes = Uint8Array.from(atob(base64), (c) => c.charCodeAt(0));
    const bitmap = await createImageBitmap(new Blob([bytes], { type: 'image/png' }));
    const canvas = new OffscreenCanvas(bitmap.width, bitmap.height);
    const context = canvas.getContext('2d')!;
    context.drawImage(bitmap, 0, 0);
    const { data } = context.getImageData(0, 0, bitmap.width, bitmap.height);
    let inked = 0;
    const colours = new Set<number>();
    for (let i = 0; i < data.length; i += 4) {
      const [r, g, b] = [data[i]!, data[i + 1]!, data[i + 2]!];
      if (Math.abs(r - 0xf6) + Math.abs(g - 0xf4) + Math.abs(b - 0xec) > 40) inked++;
      colours.add(((r >> 4) << 8) | ((g >> 4) << 4) | (b >> 4));
    }
    return { inked, total: data.length / 4, colours: colours.size };
  }, png.toString('base64'));
}

/** Clicks Run and resolves with every progress value the bar showed and the wall time until the plots were up. */
async function runOnce(target: Page): Promise<{ progress: number[]; wallMs: number; workerMs: number }> {
  const panel = target.getByTestId('run-panel');
  await panel.waitFor();
  await target.evaluate(() => {
    const seen: number[] = [];
    (window as unknown as { progressSeen: number[] }).progressSeen = seen;
    new MutationObserver(() => {
      const bar = document.querySelector('[data-testid="run-panel"] [role="progressbar"]');
      const value = Number(bar?.getAttribute('aria-valuenow'));
      if (bar && value > 0 && value !== seen[seen.length - 1]) seen.push(value);
    }).observe(document.querySelector('[data-testid="run-panel"]')!, { subtree: true, childList: true, attributes: true });
  });
  const started = Date.now();
  await panel.getByRole('button', { name: /^Run( again)?$/ }).click();
  await panel.getByTestId('run-results').waitFor();
  await target.waitForFunction(() => document.querySelectorAll('[data-testid="run-panel"] .uplot canvas').length >= 5);
  const wallMs = Date.now() - started;
  const progress = await target.evaluate(() => (window as unknown as { progressSeen: number[] }).progressSeen);
  const workerMs = Number(await panel.getByTestId('run-elapsed').getAttribute('data-ms'));
  return { progress, wallMs, workerMs };
}

const median = (values: number[]) => {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted.length % 2 ? sorted[(sorted.length - 1) / 2]! : 0.5 * (sorted[sorted.length / 2 - 1]! + sorted[sorted.length / 2]!);
};

beforeAll(async () => {
  browser = await launchBrowser();
  page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signIn(page, EDITOR.email, EDITOR.password);
  timedSheetId = await createSheet(sheetRunningFor(TIMED_TICKS, 'Browser test: 2,000-tick run'));
  progressSheetId = await createSheet(sheetRunningFor(PROGRESS_TICKS, 'Browser test: 200,000-tick noisy run', true));
  longSheetId = await createSheet(sheetRunningFor(LONG_TICKS, 'Browser test: million-tick run', true));
});

afterAll(async () => {
  await browser?.close();
});

describe('3D view, its SVG fallback, runs and sweeps on the sheet page', () => {
  it('draws the scene with WebGL into a canvas that is not blank', async () => {
    await openSheet(page, timedSheetId);
    const view = page.getByTestId('scene-view');
    // The view learns whether WebGL works once its island has loaded the 3D code.
    await expect.poll(() => view.getAttribute('data-webgl'), { timeout: 30_000 }).toBe('true');
    const canvas = view.getByTestId('scene-3d').locator('canvas');
    await canvas.waitFor();
    // Object, three rollers, chains, arrows and the palm grid: a good share of inked pixels in many colours (a busy machine may take a few frames to draw it).
    await expect
      .poll(async () => {
        const stats = await pixelStats(page, await canvas.screenshot());
        return stats.inked / stats.total > 0.05 && stats.colours > 20 ? 'drawn' : `inked ${(stats.inked / stats.total).toFixed(3)}, ${stats.colours} colours`;
      }, { timeout: 15_000, interval: 250 })
      .toBe('drawn');
    expect(await view.getByTestId('scene-legend').innerText()).toMatch(/Contact normal[\s\S]*Object velocity[\s\S]*Roll direction/);

    // Dragging orbits the camera: the picture changes.
    const box = (await canvas.boundingBox())!;
    const before = (await canvas.screenshot()).toString('base64');
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width / 2 + 120, box.y + box.height / 2 + 40, { steps: 8 });
    await page.mouse.up();
    await expect.poll(async () => (await canvas.screenshot()).toString('base64'), { timeout: 10_000, interval: 200 }).not.toBe(before);
    await saveScreenshot(page, 'scene-3d');
    await page.screenshot({ path: 'test-results/screenshots/scene-3d-viewport.png' });
    await canvas.screenshot({ path: 'test-results/screenshots/scene-3d-canvas.png' });
  });

  it('falls back to top, front and side SVG views where WebGL is missing', async () => {
    const context: BrowserContext = await browser.newContext({ viewport: { width: 1440, height: 1000 }, storageState: await page.context().storageState() });
    await context.addInitScript(() => {
      const original = HTMLCanvasElement.prototype.getContext;
      HTMLCanvasElement.prototype.getContext = function (this: HTMLCanvasElement, kind: string, ...rest: unknown[]) {
        if (/webgl/.test(kind)) return null;
        return (original as (...args: unknown[]) => unknown).call(this, kind, ...rest);
      } as typeof original;
    });
    const noGl = await context.newPage();
    await openSheet(noGl, timedSheetId);
    const fallback = noGl.getByTestId('scene-fallback');
    await fallback.waitFor();
    expect(await noGl.getByTestId('scene-view').getAttribute('data-webgl')).toBe('false');
    expect(await noGl.getByTestId('scene-3d').count()).toBe(0);
    for (const name of ['top', 'front', 'side']) {
      const svg = fallback.locator(`svg[data-view="${name}"]`);
      expect(await svg.locator('polygon[data-part="object"]').count()).toBe(1);
      expect(await svg.locator('polygon[data-part^="roller-"]').count()).toBe(3);
      expect(await svg.locator('g[data-part="contact"]').count()).toBe(3);
      expect(await svg.locator('g[data-part="contact"] line').count()).toBeGreaterThanOrEqual(6);
    }
    await saveScreenshot(noGl, 'scene-fallback');
    await fallback.screenshot({ path: 'test-results/screenshots/scene-fallback-views.png' });
    await context.close();
  });

  it('runs 200,000 noisy ticks to completion while the progress bar advances', async () => {
    await openSheet(page, progressSheetId);
    const { progress } = await runOnce(page);
    // The page draws progress at most once a frame, so a run the worker finishes in a few frames shows a few values.
    expect(progress.length).toBeGreaterThanOrEqual(2);
    expect(progress.every((v, k) => k === 0 || v > progress[k - 1]!)).toBe(true);
    expect(progress[progress.length - 1]).toBeLessThanOrEqual(PROGRESS_TICKS);
    const panel = page.getByTestId('run-panel');
    expect(await panel.getByTestId('run-tick-count').innerText()).toBe('200,000');
    expect(await panel.getByRole('progressbar').count()).toBe(0);
  });

  it('runs 2,000 ticks in the worker and plots angles, rates, errors and warnings', async () => {
    await openSheet(page, timedSheetId);
    const times: { wallMs: number; workerMs: number }[] = [];
    for (let i = 0; i < 5; i++) times.push(await runOnce(page));
    const panel = page.getByTestId('run-panel');
    expect(await panel.getByTestId('run-tick-count').innerText()).toBe('2,000');
    expect(await panel.getByTestId('run-stop-reason').innerText()).toMatch(/most time steps/);
    expect(await panel.locator('.uplot').count()).toBe(5);
    for (const title of ['Joint angles', 'Joint rates', 'Orientation error (angles)', 'Orientation error (dimensionless metrics)', 'Position error']) {
      expect(await panel.locator('figcaption', { hasText: title }).count()).toBe(1);
    }
    expect(await panel.locator('.u-legend').first().innerText()).toMatch(/north-base/);
    await panel.getByTestId('warning-strip').waitFor();
    const plot = panel.locator('.uplot canvas').first();
    const stats = await pixelStats(page, await plot.screenshot());
    expect(stats.colours).toBeGreaterThan(4);
    console.info(
      `2,000-tick run: worker median ${median(times.map((t) => t.workerMs)).toFixed(1)} ms, click-to-plots median ${median(times.map((t) => t.wallMs))} ms`,
      JSON.stringify(times.map(({ wallMs, workerMs }) => ({ wallMs, workerMs }))),
    );
    await panel.scrollIntoViewIfNeeded();
    await saveScreenshot(page, 'run-plots');
    await panel.screenshot({ path: 'test-results/screenshots/run-panel.png' });
  });

  it('cancels a million-tick run part way by terminating the worker', async () => {
    await openSheet(page, longSheetId);
    const panel = page.getByTestId('run-panel');
    await panel.getByRole('button', { name: 'Run', exact: true }).click();
    const bar = panel.getByRole('progressbar');
    await page
      .waitForFunction(() => Number(document.querySelector('[data-testid="run-panel"] [role="progressbar"]')?.getAttribute('aria-valuenow')) > 0)
      .catch(async (error) => {
        await saveScreenshot(page, 'run-progress-missing');
        throw new Error(`no progress shown; the panel reads: ${await panel.innerText()}`, { cause: error });
      });
    expect(await bar.getAttribute('aria-valuemax')).toBe(String(LONG_TICKS));
    await panel.screenshot({ path: 'test-results/screenshots/run-progress.png' });
    await panel.getByRole('button', { name: 'Cancel' }).click();
    const cancelled = panel.getByTestId('job-cancelled');
    await cancelled.waitFor();
    expect(await cancelled.innerText()).toMatch(/Cancelled after [\d,]+ of 1,000,000 time steps/);
    expect(await panel.getByTestId('run-results').count()).toBe(0);
    expect(await panel.getByRole('progressbar').count()).toBe(0);
    await panel.getByRole('button', { name: 'Run', exact: true }).isEnabled();
  });

  it('sweeps a roller radius and plots rates, conditioning, residual and gap over it', async () => {
    await openSheet(page, timedSheetId);
    const panel = page.getByTestId('sweep-panel');
    await panel.getByLabel('Input to sweep').selectOption('/hand/fingers/0/roller/radius');
    expect(await panel.getByLabel('From (mm)').inputValue()).toBe('9');
    expect(await panel.getByLabel('To (mm)').inputValue()).toBe('15');
    await panel.getByLabel('Steps').fill('25');
    await panel.getByRole('button', { name: 'Sweep' }).click();
    await panel.getByTestId('sweep-results').waitFor();
    await page.waitForFunction(() => document.querySelectorAll('[data-testid="sweep-panel"] .uplot canvas').length >= 4);
    for (const title of ['Commanded joint rates: steer-and-roll', 'Rank-loss ratio the warning judges', 'Slip speed left: steer-and-roll', 'Contact gap']) {
      expect(await panel.locator('figcaption', { hasText: title }).count()).toBe(1);
    }
    expect(await panel.locator('.u-legend').nth(3).innerText()).toMatch(/north[\s\S]*southwest[\s\S]*southeast/);
    // Every plot has its full width, the log-scaled rank-loss ratio too (one finger sits at rank loss: a tiny, still finite ratio).
    const widths = await panel.locator('.uplot canvas').evaluateAll((canvases) => canvases.map((c) => c.getBoundingClientRect().width));
    expect(widths.every((w) => w > 200), JSON.stringify(widths)).toBe(true);
    await panel.scrollIntoViewIfNeeded();
    await panel.screenshot({ path: 'test-results/screenshots/sweep-panel.png' });
  });
});
