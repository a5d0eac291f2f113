import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { baseUrl, deleteCreatedSheets, launchBrowser, SCREENSHOT_DIR, signIn, shownText } from './browser';
import { evaluateSheet } from '../../src/lib/sheet/evaluate';
import { displayValue, findOutput } from '../../src/lib/sheet/outputs';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };
const SHEET_FILE = new URL('../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url);

let browser: Browser;
let page: Page;
const created: string[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
  page = await (await browser.newContext({ viewport: { width: 1600, height: 1000 } })).newPage();
  await signIn(page, EDITOR.email, EDITOR.password);
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await deleteCreatedSheets(created);
});

describe('curvature on the sheet page', () => {
  it('shows each contact\'s curvatures and contact-point speed, as the evaluation gives them, and their derivation', async () => {
    // Its own copy of the example: other browser tests save edits to the seeded demo sheets.
    const document = JSON.parse(readFileSync(SHEET_FILE, 'utf8')) as { title: string };
    const evaluated = evaluateSheet(document);
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const { result } = evaluated.value;
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const answer = await page.request.post(`${baseUrl()}/api/sheets`, { data: { teamId: me.currentTeam, title: `${document.title} (curvature check)`, document } });
    expect(answer.status()).toBe(201);
    const { sheetId } = await answer.json();
    created.push(sheetId);
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const relative = page.locator('[data-result="0.curvature.relative"]').first();
    await relative.waitFor();
    const definition = findOutput('curvature.relative');
    await expect(shownText(relative)).resolves.toBe(displayValue(definition, definition.read(result, 0)));
    const speed = findOutput('curvature.wander.rollerSpeed');
    await expect(shownText(page.locator('[data-result="0.curvature.wander"]').first())).resolves.toContain(
      `moves over the roller at ${displayValue(speed, speed.read(result, 0))} mm/s`,
    );
    mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await page.locator('[data-contact="0"]').screenshot({ path: join(SCREENSHOT_DIR, 'curvature-results.png') });
    const derivation = page.locator('[data-derivation="finger.0.curvature.relative"]');
    // The derivation (and KaTeX) load once its section nears the screen.
    await page.locator('#derivation').scrollIntoViewIfNeeded();
    await derivation.waitFor({ timeout: 20_000 });
    await expect(derivation.locator('.katex').count()).resolves.toBeGreaterThan(0);
    await page.locator('[data-derivation^="finger.0.curvature."]').last().screenshot({ path: join(SCREENSHOT_DIR, 'curvature-derivation-last.png') });
    await derivation.screenshot({ path: join(SCREENSHOT_DIR, 'curvature-derivation.png') });
  }, 60_000);
});
