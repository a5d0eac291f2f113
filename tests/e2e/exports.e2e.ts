import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runSheet, sweepSheet } from '../../src/lib/kinematics';
import { SAFETY_CAUTION_TEXT, SAFETY_CSV_COMMENT } from '../../src/lib/safety';
import { evaluateSheet } from '../../src/lib/sheet/evaluate';
import { columnHeader, runExportTable, sweepExportTable, type ExportJson, type ExportTable } from '../../src/lib/sheet/run-export';
import type { SheetDocument } from '../../src/lib/sheet/types';
import { baseUrl, launchBrowser, saveScreenshot, signIn } from './browser';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const DEMO_SHEET = 'Bearing housing: index a quarter turn';

let browser: Browser;
let page: Page;
let sheetId = '';
let revision = 0;
let doc: SheetDocument;

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1600, height: 1000 }, acceptDownloads: true });
  page = await context.newPage();
  await signIn(page, EDITOR.email, EDITOR.password);
  const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
  const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}&q=${encodeURIComponent('Bearing housing')}`)).json();
  sheetId = list.items.find((s: { title: string }) => s.title === DEMO_SHEET).id;
  const sheet = await (await page.request.get(`${baseUrl()}/api/sheets/${sheetId}`)).json();
  revision = sheet.revision.number;
  const evaluated = evaluateSheet(sheet.revision.inputs);
  if (!evaluated.ok) throw new Error('the demo sheet does not read');
  doc = evaluated.value.doc;
}, 60_000);

afterAll(async () => {
  await browser?.close();
});

/** Clicks a button of the panel and reads the file the browser downloads (playwright's download event). */
async function download(panel: ReturnType<Page['getByTestId']>, button: string): Promise<{ name: string; text: string }> {
  const [file] = await Promise.all([page.waitForEvent('download'), panel.getByRole('button', { name: button }).click()]);
  return { name: file.suggestedFilename(), text: readFileSync((await file.path())!, 'utf8') };
}

/** The numeric cells of a parsed CSV against the same computation in Node: the run and sweep are deterministic (seeded noise). */
function expectRowsNear(rows: Record<string, unknown>[], table: ExportTable) {
  expect(rows).toHaveLength(table.rowCount);
  for (const column of table.columns) {
    const header = columnHeader(column);
    rows.forEach((row, i) => {
      const expected = column.values[i]!;
      if (typeof expected === 'number') expect(row[header] as number).toBeCloseTo(expected, 9);
      else expect(row[header] ?? '').toBe(expected);
    });
  }
}

describe('run and sweep exports', () => {
  it('downloads the run as CSV and JSON: safety line, sheet and revision, named columns, the rows the core computes', async () => {
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const panel = page.getByTestId('run-panel');
    await panel.getByRole('button', { name: /^Run( again)?$/ }).click();
    await panel.getByTestId('run-results').waitFor();
    const ticks = Number((await panel.getByTestId('run-tick-count').innerText()).replace(/,/g, ''));

    const csv = await download(panel, 'Export CSV');
    expect(csv.name).toBe(`bearing-housing-index-a-quarter-turn-r${revision}-run.csv`);
    const lines = csv.text.split('\n');
    expect(lines[0]).toBe(SAFETY_CSV_COMMENT);
    expect(lines[1]).toBe(`# sheet: "${DEMO_SHEET}", id ${sheetId}, rev ${revision}`);
    const parsed = Papa.parse<Record<string, unknown>>(csv.text, { comments: '#', header: true, dynamicTyping: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data).toHaveLength(ticks);
    const finger = doc.hand.fingers[0]!;
    expect(parsed.meta.fields).toContain(`${finger.name}/${finger.joints[0]!.name} rate [rad/s]`);
    expectRowsNear(parsed.data, runExportTable(doc, runSheet(doc)));

    const json = await download(panel, 'Export JSON');
    expect(json.name).toBe(`bearing-housing-index-a-quarter-turn-r${revision}-run.json`);
    const exported = JSON.parse(json.text) as ExportJson;
    expect(exported.sheet).toEqual({ id: sheetId, title: DEMO_SHEET, revision, unsavedChanges: false });
    expect(exported.safety).toBe(SAFETY_CAUTION_TEXT);
    expect(exported.units).toBe('SI');
    expect(exported.rows).toHaveLength(ticks);
    expect(exported.columns.map(columnHeader)).toEqual(parsed.meta.fields);
    await saveScreenshot(page, 'run-export');
  }, 120_000);

  it('downloads the sweep as CSV: one row per swept value, as the core sweeps it', async () => {
    const panel = page.getByTestId('sweep-panel');
    await panel.getByLabel('Steps').fill('5');
    await panel.getByRole('button', { name: 'Sweep' }).click();
    await panel.getByTestId('sweep-results').waitFor();
    const path = await panel.locator('select[name="sweepPath"]').inputValue();
    const csv = await download(panel, 'Export CSV');
    expect(csv.name).toBe(`bearing-housing-index-a-quarter-turn-r${revision}-sweep.csv`);
    expect(csv.text.split('\n')[0]).toBe(SAFETY_CSV_COMMENT);
    const parsed = Papa.parse<Record<string, unknown>>(csv.text, { comments: '#', header: true, dynamicTyping: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields![0]).toMatch(new RegExp(`^${path.replace(/[/]/g, '\\/')} \\[`));
    const values = parsed.data.map((row) => row[parsed.meta.fields![0]!] as number);
    const settings = { path, from: values[0]!, to: values.at(-1)!, steps: values.length };
    expectRowsNear(parsed.data, sweepExportTable(doc, sweepSheet(doc, settings)));
    await saveScreenshot(page, 'sweep-export');
  }, 120_000);
});
