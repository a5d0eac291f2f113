import { join } from 'node:path';
import { SAFETY_CSV_COMMENT } from '../../src/lib/safety';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Locator, Page } from 'playwright-core';
import { runSheet } from '../../src/lib/kinematics/index';
import { runLogCsv } from '../../src/lib/logs/generate';
import { DEMO_PASSWORD } from '../../src/lib/server/demo';
import { parseSheet } from '../../src/lib/sheet/schema';
import { waitForMailboxMail } from '../helpers/mail';
import { baseUrl, deleteCreatedSheets, launchBrowser, mailboxDir, SCREENSHOT_DIR, signIn } from './browser';

let browser: Browser;
const created: string[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await deleteCreatedSheets(created);
});

const FILE_NAME = 'tarnwhistle-cell4-replay.csv';
const TITLE = 'Bearing housing replay check (log comparison browser test)';

/** Opens the log's comparison panel (on the sheet page loaded afresh unless `reload` is false) and waits for its mapping form. */
async function openComparison(page: Page, sheetId: string, reload = true): Promise<{ panel: Locator; row: Locator; comparison: Locator }> {
  if (reload) await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
  const panel = page.locator('[data-logs-panel]');
  await panel.scrollIntoViewIfNeeded();
  const row = panel.locator('[data-log]', { hasText: FILE_NAME });
  await expect.poll(() => row.count(), { timeout: 30_000 }).toBe(1);
  await row.locator('[data-compare-log]').click();
  const comparison = row.locator('[data-log-comparison]');
  await expect.poll(() => comparison.locator('[data-mapping-form]').count(), { timeout: 20_000 }).toBe(1);
  return { panel, row, comparison };
}

/** Wall time (ms) from one wheel notch over the first plot until every plot has redrawn (two animation frames). */
function timeWheelZoom(comparison: Locator, deltaY: number): Promise<number> {
  return comparison.evaluate(async (root, delta) => {
    const over = root.querySelector('[data-comparison-charts] .u-over')!;
    const box = over.getBoundingClientRect();
    const start = performance.now();
    over.dispatchEvent(new WheelEvent('wheel', { deltaY: delta, clientX: box.left + box.width * 0.4, clientY: box.top + box.height / 2, bubbles: true, cancelable: true }));
    await new Promise((done) => requestAnimationFrame(() => requestAnimationFrame(done)));
    return performance.now() - start;
  }, deltaY);
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!;

describe('comparing a controller log with the sheet', () => {
  it('the reviewer compares a log, reads the plots, zooms, re-runs on the author\'s new revision, sees both side by side, signs the revision, and the report lists the log', { timeout: 240_000 }, async () => {
    const author = await browser.newPage();
    await signIn(author, 'editor@tarnwhistle.example', DEMO_PASSWORD);
    const me = await (await author.request.get(`${baseUrl()}/api/me`)).json();
    const found = await (await author.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}&q=${encodeURIComponent('Bearing housing')}`)).json();
    const demo = await (await author.request.get(`${baseUrl()}/api/sheets/${found.items[0].id}`)).json();
    const inputs = { ...demo.revision.inputs, title: TITLE };
    const made = await author.request.post(`${baseUrl()}/api/sheets`, { data: { teamId: me.currentTeam, title: TITLE, document: inputs } });
    expect(made.status()).toBe(201);
    const { sheetId } = (await made.json()) as { sheetId: string };
    created.push(sheetId);
    const parsed = parseSheet(inputs);
    if (!parsed.ok) throw new Error('the demo sheet does not parse');
    const doc = parsed.doc;
    // 4,000 samples fill the comparison's 2,000 plot buckets, as many points as a 100,000-sample log gives the plots.
    const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: 4000, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
    const log = Buffer.from(runLogCsv(doc, record));

    const page = await browser.newPage({ viewport: { width: 1400, height: 1000 } });
    await signIn(page, 'reviewer@tarnwhistle.example', DEMO_PASSWORD);
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const logsPanel = page.locator('[data-logs-panel]');
    await logsPanel.scrollIntoViewIfNeeded();
    await logsPanel.locator('[data-log-input]').setInputFiles({ name: FILE_NAME, mimeType: 'text/csv', buffer: log });
    // The upload is still streaming: open the panel without leaving the page.
    let { panel, row, comparison } = await openComparison(page, sheetId, false);
    // Prefilled from the column names the generator writes.
    expect(await comparison.getByLabel('Time column').inputValue()).toBe('t');
    expect(await comparison.getByLabel('Quaternion w column').inputValue()).toBe('qw');
    expect(await comparison.locator('[data-safety-caution]').count()).toBe(1);
    await comparison.locator('[data-run-comparison]').click();
    await expect.poll(() => comparison.locator('[data-verdict]').count(), { timeout: 60_000 }).toBe(1);
    // The log is the sheet's own run: the re-solved sheet gives its rates back.
    expect(await comparison.locator('[data-verdict]').getAttribute('data-verdict')).toBe('pass');
    const jointCount = doc.hand.fingers.reduce((n, f) => n + f.joints.length, 0);
    expect(await comparison.locator('[data-joint-table] tbody tr').count()).toBe(jointCount);

    // Per joint the rates and the residual with its tolerance lines, then the slip; one canvas per plot.
    const charts = comparison.locator('[data-comparison-charts]');
    await expect.poll(() => charts.locator('[data-joint-plots]').count()).toBe(jointCount);
    await expect.poll(() => charts.locator('canvas').count()).toBe(2 * jointCount + 1);
    expect(await charts.locator('[data-slip-plot] figcaption').innerText()).toBe('Slip per contact');
    expect(await charts.getByRole('img', { name: /residual.*: residual, \+tolerance, −tolerance over s/ }).count()).toBe(jointCount);
    const bands = await charts.locator('[data-warning-bands]').getAttribute('data-warning-bands').catch(() => null);
    await comparison.screenshot({ path: join(SCREENSHOT_DIR, 'log-comparison.png') });
    await charts.locator('[data-joint-plots]').first().screenshot({ path: join(SCREENSHOT_DIR, 'log-comparison-joint.png') });
    await charts.locator('[data-slip-plot]').screenshot({ path: join(SCREENSHOT_DIR, 'log-comparison-slip.png') });
    // The mapping table of a nine-joint hand is wider than the panel: it scrolls inside it rather than spilling past its border.
    const comparisonRight = await comparison.evaluate((el) => el.getBoundingClientRect().right);
    const panelRight = await panel.evaluate((el) => el.getBoundingClientRect().right);
    expect(comparisonRight).toBeLessThanOrEqual(panelRight);

    // Zoom: the wheel over one plot zooms every plot (the time it takes is printed, a measurement on a shared machine, not a check); Reset zoom shows all again; a drag selects a stretch.
    const figures = charts.locator('[data-testid="line-chart"]');
    const reset = charts.locator('[data-reset-zoom]');
    expect(await reset.isDisabled()).toBe(true);
    const zoomTimes: number[] = [];
    for (let i = 0; i < 9; i++) zoomTimes.push(await timeWheelZoom(comparison, -60));
    await expect.poll(() => figures.evaluateAll((all) => all.every((f) => f.getAttribute('data-zoomed') === 'true'))).toBe(true);
    console.log(`wheel zoom across ${2 * jointCount + 1} plots of ${record.tickCount} samples (2,000 buckets): median ${median(zoomTimes).toFixed(1)} ms (runs: ${zoomTimes.map((t) => t.toFixed(1)).join(', ')}); warning bands: ${bands ?? 0}`);
    await charts.locator('[data-joint-plots]').first().screenshot({ path: join(SCREENSHOT_DIR, 'log-comparison-joint-zoomed.png') });
    await reset.click();
    await expect.poll(() => figures.evaluateAll((all) => all.some((f) => f.hasAttribute('data-zoomed')))).toBe(false);
    const over = charts.locator('.u-over').first();
    await over.scrollIntoViewIfNeeded();
    const box = (await over.boundingBox())!;
    await page.mouse.move(box.x + box.width * 0.2, box.y + box.height / 2);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height / 2, { steps: 5 });
    await page.mouse.up();
    await expect.poll(() => figures.evaluateAll((all) => all.every((f) => f.getAttribute('data-zoomed') === 'true'))).toBe(true);
    // A shift-drag to the left pans later in time by the dragged share of the span, the span kept.
    const shownRange = async () => (await charts.getAttribute('data-x-range'))!.split(' ').map(Number) as [number, number];
    const [selectedMin, selectedMax] = await shownRange();
    await page.keyboard.down('Shift');
    await page.mouse.move(box.x + box.width * 0.6, box.y + box.height / 2);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.4, box.y + box.height / 2, { steps: 4 });
    await page.mouse.up();
    await page.keyboard.up('Shift');
    const [pannedMin, pannedMax] = await shownRange();
    expect(pannedMax - pannedMin).toBeCloseTo(selectedMax - selectedMin, 6);
    expect(pannedMin).toBeGreaterThan(selectedMin);
    await reset.click();
    expect(await charts.getAttribute('data-x-range')).toBe('all');

    // The per-sample table: a header with units, one row per compared sample.
    const seriesHref = await comparison.locator('[data-series-csv]').first().getAttribute('href');
    const series = await (await page.request.get(`${baseUrl()}${seriesHref}`)).text();
    const [safety, ...lines] = series.trimEnd().split('\n');
    expect(safety).toBe(SAFETY_CSV_COMMENT);
    expect(lines[0]).toMatch(/^line,time_s,.+\.logged_rad_s,.+\.sheet_(steer_and_roll|full)_rad_s,.+\.residual_rad_s,.*\.slip_m_s,warnings$/);
    expect(lines).toHaveLength(record.tickCount + 1);

    // The author saves revision 2 with the gain doubled; the sheet's law then commands twice the rates.
    const saved = await author.request.post(`${baseUrl()}/api/sheets/${sheetId}/revisions`, {
      data: { baseRevision: 1, document: { ...inputs, motion: { ...inputs.motion, run: { ...inputs.motion.run, gain: '3 /s' } } }, message: 'Faster approach' },
    });
    expect(saved.status()).toBe(201);

    ({ panel, row, comparison } = await openComparison(page, sheetId));
    const list = comparison.locator('[data-comparison-list]');
    await expect.poll(() => list.locator('[data-comparison-item]').count()).toBe(1);
    const rerun = list.locator('[data-rerun]');
    expect(await rerun.innerText()).toBe('Re-run on rev 2');
    await rerun.click();
    await expect.poll(() => list.locator('[data-comparison-item][data-revision="2"]').count(), { timeout: 60_000 }).toBe(1);
    await expect.poll(() => comparison.locator('[data-verdict]').getAttribute('data-verdict'), { timeout: 30_000 }).toBe('fail');
    expect(await list.locator('[data-comparison-item][data-revision="2"] [data-rerun]').count()).toBe(0);

    await list.locator('[data-pick-comparison]').nth(0).check();
    await list.locator('[data-pick-comparison]').nth(1).check();
    const side = comparison.locator('[data-side-by-side]');
    await expect.poll(() => side.count()).toBe(1);
    expect(await side.locator('[data-side-verdict]').getAttribute('data-change')).toBe('worse');
    expect(await side.locator('td[data-change="worse"]').count()).toBeGreaterThan(0);
    await side.screenshot({ path: join(SCREENSHOT_DIR, 'log-comparison-side-by-side.png') });

    // The reviewer signs revision 2 as checked; its author is mailed.
    const review = page.locator('[data-review-panel]');
    await review.scrollIntoViewIfNeeded();
    await review.getByRole('button', { name: 'Sign rev 2 as checked' }).click();
    await expect.poll(() => page.locator('[data-title-block] [data-checked-by]').innerText(), { timeout: 15_000 }).toBe('Mei Arroyo');
    const mail = await waitForMailboxMail(mailboxDir(), 'editor@tarnwhistle.example', { subject: `Checked: ${TITLE}, rev 2` });
    expect(mail.text).toContain(`signed revision 2 of "${TITLE}" as checked.`);

    // The report of revision 2 lists the log's latest comparison with it, beside the safety caution.
    await page.goto(`${baseUrl()}/sheets/${sheetId}/report?revision=2`, { waitUntil: 'networkidle' });
    const logsSection = page.locator('[data-testid="controller-logs"]');
    const entry = logsSection.locator(`[data-controller-log="${FILE_NAME}"]`);
    expect(await entry.locator('[data-verdict]').getAttribute('data-verdict')).toBe('fail');
    expect(await entry.locator('tbody tr').count()).toBe(jointCount + doc.hand.fingers.length);
    expect(await logsSection.locator('[data-safety-caution]').count()).toBe(1);
    await logsSection.screenshot({ path: join(SCREENSHOT_DIR, 'report-controller-logs.png') });

    // Deleting the log takes its comparisons with it.
    ({ panel, row } = await openComparison(page, sheetId));
    await row.getByRole('button', { name: 'Delete' }).click();
    await expect.poll(() => panel.locator('[data-log]', { hasText: FILE_NAME }).count()).toBe(0);
    await page.close();
    await author.close();
  });
});
