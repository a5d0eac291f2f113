import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launchBrowser, saveScreenshot, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const DEMO_TITLES = [
  'Bearing housing: index a quarter turn',
  'Peg: tilt about the grip line',
  'Peg: tilt with 16 mm rollers',
  'Retrofit fingers: mounting review',
];

let browser: Browser;
let page: Page;

/** Titles of the rows the sheet table shows once it has settled. */
async function shownTitles(): Promise<string[]> {
  await page.waitForSelector('[data-testid="sheet-table"][aria-busy="false"]');
  return page.locator('[data-testid="sheet-table"] tbody tr[data-sheet-title]').evaluateAll((rows) => rows.map((row) => row.getAttribute('data-sheet-title') ?? ''));
}

/** Waits until the table shows exactly the rows `accept` is waiting for (the list refetches after each filter change). */
async function waitForRows(accept: (titles: string[]) => boolean): Promise<string[]> {
  const deadline = Date.now() + 10_000;
  for (;;) {
    const titles = await shownTitles();
    if (accept(titles) || Date.now() > deadline) return titles;
    await page.waitForTimeout(100);
  }
}

beforeAll(async () => {
  browser = await launchBrowser();
  page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  await signIn(page, EDITOR.email, EDITOR.password);
});

afterAll(async () => {
  await browser?.close();
});

describe('sheet list, history and comparison', () => {
  it('lists the demo sheets with revisions, warning badges and the fork marker', async () => {
    await page.goto(`${baseUrl()}/sheets`, { waitUntil: 'networkidle' });
    const titles = await waitForRows((t) => t.length >= 8);
    for (const title of DEMO_TITLES) expect(titles).toContain(title);
    const fork = page.locator('tr[data-sheet-title="Peg: tilt with 16 mm rollers"]');
    // A derived sheet carries a drawing-office revision delta holding the origin's revision, and a title-block line naming it.
    expect(await fork.getByTestId('forked-from').innerText()).toMatch(/derived from sheet Peg: tilt about the grip line, rev 3/);
    expect(await fork.locator('[data-revision-delta]').textContent()).toBe('3');
    expect(await page.getByText(/forked from/i).count()).toBe(0);
    expect(await page.locator('tr[data-sheet-title="Peg: tilt about the grip line"] td').nth(3).innerText()).toBe('rev 3');
    // The demo checker signed the peg sheet's revision 3 as checked and returned the retrofit sheet's revision 2.
    expect(await page.locator('tr[data-sheet-title="Peg: tilt about the grip line"] [data-review-badge]').innerText()).toBe('checked rev 3');
    expect(await page.locator('tr[data-sheet-title="Retrofit fingers: mounting review"] [data-review-badge]').innerText()).toBe('returned for correction rev 2');
    expect(await page.locator('[data-worst]').count()).toBe(titles.length);
    expect(await page.getByTestId('new-sheet').getAttribute('href')).toBe('/sheets/new');
    await saveScreenshot(page, 'sheet-list');
  });

  it('searches by title and tag on the server', async () => {
    await page.getByTestId('sheet-search').fill('peg');
    const byTitle = await waitForRows((t) => t.length === 2);
    expect(byTitle.sort()).toEqual(['Peg: tilt about the grip line', 'Peg: tilt with 16 mm rollers']);
    // The URL follows once the keystroke's frame is painted.
    await expect.poll(() => new URL(page.url()).searchParams.get('q')).toBe('peg');
    await page.getByTestId('sheet-search').fill('review');
    expect(await waitForRows((t) => t.length === 1)).toEqual(['Retrofit fingers: mounting review']);
    await saveScreenshot(page, 'sheet-list-search');
    await page.getByTestId('sheet-search').fill('');
    await waitForRows((t) => t.length >= 8);
  });

  it('asks the server once per typed key and shows the newest answer', async () => {
    const asked: string[] = [];
    const record = (request: { url: () => string }) => {
      const url = new URL(request.url());
      if (url.pathname === '/api/sheets') asked.push(url.searchParams.get('q') ?? '');
    };
    page.on('request', record);
    await page.getByTestId('sheet-search').pressSequentially('peg');
    const titles = await waitForRows((t) => t.length === 2);
    page.off('request', record);
    expect(titles.sort()).toEqual(['Peg: tilt about the grip line', 'Peg: tilt with 16 mm rollers']);
    // One request per key: the query the render makes finds the one the keystroke sent rather than asking again.
    expect(asked).toEqual(['p', 'pe', 'peg']);
    await page.getByTestId('sheet-search').fill('');
    await waitForRows((t) => t.length >= 8);
  });

  it('filters by warning status', async () => {
    const all = await shownTitles();
    await page.getByTestId('warning-filter').selectOption('clean');
    const clean = await waitForRows((t) => t.length < all.length);
    const cleanBadges = await page.locator('[data-testid="sheet-table"] [data-worst]').evaluateAll((els) => els.map((el) => el.getAttribute('data-worst')));
    expect(cleanBadges.every((worst) => worst === 'none')).toBe(true);
    if (clean.length === 0) expect(await page.getByTestId('no-sheets').innerText()).toMatch(/No sheet matches/);

    await page.getByTestId('warning-filter').selectOption('singular');
    const singular = await waitForRows((t) => t.length > 0 && t.length + clean.length <= all.length);
    const singularBadges = await page.locator('[data-testid="sheet-table"] [data-worst]').evaluateAll((els) => els.map((el) => el.getAttribute('data-worst')));
    expect(singular.length).toBeGreaterThan(0);
    expect(singularBadges.every((worst) => worst === 'singular')).toBe(true);
    await saveScreenshot(page, 'sheet-list-singular');
    await page.getByTestId('warning-filter').selectOption('any');
    await waitForRows((t) => t.length === all.length);
  });

  it('opens the history of the peg sheet with its three revisions and its fork', async () => {
    await page.locator('tr[data-sheet-title="Peg: tilt about the grip line"]').getByRole('link', { name: 'rev 3' }).click();
    await page.waitForURL(/\/sheets\/[^/]+\/history$/);
    expect(await page.locator('tr[data-revision]').count()).toBe(3);
    expect(await page.getByTestId('fork-list').innerText()).toMatch(/Peg: tilt with 16 mm rollers/);
    await saveScreenshot(page, 'sheet-history');
  });

  it('picks r1 with a click and r3 from the keyboard, then compares them and highlights the changed inputs and outputs', async () => {
    // The two latest revisions are picked when the page opens.
    expect(await page.getByTestId('compare-pair').innerText()).toMatch(/Compare from rev 2 to rev 3/);
    expect(await page.locator('input[type="radio"]').count()).toBe(0);
    await page.locator('tr[data-revision="1"] [data-pick]').click();
    expect(await page.getByTestId('compare-pair').innerText()).toMatch(/Compare from rev 1 to rev 3\s+the next click sets the “to” end/);
    await page.locator('tr[data-revision="2"] [data-pick]').click({ modifiers: ['Shift'] });
    expect(await page.getByTestId('compare-pair').innerText()).toMatch(/Compare from rev 1 to rev 2/);
    await page.locator('tr[data-revision="3"] [data-pick]').focus();
    await page.keyboard.press('Enter');
    expect(await page.getByTestId('compare-pair').innerText()).toMatch(/Compare from rev 1 to rev 3/);
    expect(await page.locator('tr[data-revision="1"]').getAttribute('data-end')).toBe('from');
    expect(await page.locator('tr[data-revision="3"] [data-pick]').getAttribute('aria-pressed')).toBe('true');
    expect(await page.locator('tr[data-revision="2"] [data-pick]').getAttribute('aria-pressed')).toBe('false');
    await saveScreenshot(page, 'sheet-history-picked');
    await page.getByTestId('compare-submit').click();
    await page.waitForURL(/\/compare\?/);
    const chosen = new URL(page.url()).searchParams;
    expect([chosen.get('from'), chosen.get('to')]).toEqual(['1', '3']);
    const changedInputs = await page.locator('[data-testid="input-diff"] tr[data-kind="changed"]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-path')));
    expect(changedInputs).toContain('object.twist.angular');
    expect(changedInputs).toContain('hand.fingers[0].joints[0].rateLimit');
    const major = page.locator('[data-testid="output-diff"] tr[data-level="major"]');
    expect(await major.count()).toBeGreaterThan(0);
    const highlighted = await major.first().evaluate((row) => getComputedStyle(row).backgroundColor);
    expect(highlighted).not.toBe('rgba(0, 0, 0, 0)');
    // Unchanged rows are hidden while "only what differs" is ticked.
    expect(await page.locator('[data-testid="input-diff"] tr[data-kind="same"]').first().isVisible()).toBe(false);
    expect(await page.getByTestId('compare-summary').innerText()).toMatch(/input fields? differ/);
    await saveScreenshot(page, 'sheet-compare-revisions');
  });

  it('compares across the fork: the bigger roller radius is marked and the outputs recomputed', async () => {
    await page.goBack();
    await page.getByRole('link', { name: /Compare rev 3 here with the fork's rev 2/ }).click();
    await page.waitForURL(/toSheet=/);
    const radius = page.locator('[data-testid="input-diff"] tr[data-path="hand.fingers[0].roller.radius"]');
    expect(await radius.getAttribute('data-kind')).toBe('changed');
    expect(await radius.innerText()).toMatch(/0\.014\s+16 mm/);
    expect(await page.locator('[data-testid="output-diff"] tr[data-kind="changed"]').count()).toBeGreaterThan(0);
    await saveScreenshot(page, 'sheet-compare-fork');
  });

  it('shows the print report with formulas, results and the safety caution', async () => {
    const sheetPath = new URL(page.url()).pathname.replace(/\/compare$/, '');
    await page.goto(`${baseUrl()}${sheetPath}/report`, { waitUntil: 'networkidle' });
    expect(await page.getByTestId('title-block').innerText()).toMatch(/Peg: tilt about the grip line/);
    expect(await page.getByTestId('safety-caution').innerText()).toMatch(/not safety-rated/);
    expect(await page.locator('.derivation .katex').count()).toBeGreaterThan(10);
    expect(await page.getByTestId('result-table').count()).toBe(3);
    await saveScreenshot(page, 'sheet-report');
  });

  it('imports a broken file and shows where it is broken', async () => {
    await page.goto(`${baseUrl()}/sheets`, { waitUntil: 'networkidle' });
    await page.getByTestId('import-open').click();
    await page.getByTestId('import-file').setInputFiles({
      name: 'broken.json',
      mimeType: 'application/json',
      buffer: Buffer.from('{\n  "format": "slipless.sheet",\n  "version": 1,\n  "title": "Broken",\n}\n'),
    });
    await page.getByTestId('import-submit').click();
    await page.getByTestId('import-errors').waitFor();
    expect(await page.getByTestId('import-errors').innerText()).toMatch(/line 5, col(umn)? 1/);
    await saveScreenshot(page, 'sheet-import-error');
  });
});
