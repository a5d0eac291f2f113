import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { createSheetFromTemplate } from '../../src/lib/sheet/templates';
import { baseUrl, deleteCreatedSheets, launchBrowser, saveScreenshot, SCREENSHOT_DIR, signIn } from './browser';

const URDF = 'content/urdf/tri-roller-hand.urdf';

let browser: Browser;
let page: Page;
let sheetId = '';

/** The dialog alone (a full-page picture shows the page behind the modal instead). */
async function saveDialog(name: string): Promise<void> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.getByTestId('urdf-dialog').screenshot({ path: join(SCREENSHOT_DIR, `${name}.png`) });
}

beforeAll(async () => {
  browser = await launchBrowser();
  page = await browser.newPage({ viewport: { width: 1500, height: 1000 } });
  await signIn(page, 'editor@tarnwhistle.example', 'slipless-demo');
  const { currentTeam } = await (await page.request.get(`${baseUrl()}/api/me`)).json();
  // A 50 mm ball 90 mm above the palm: the example hand's rollers sit on its equator.
  const sheet = createSheetFromTemplate('duo-opposed', { kind: 'sphere', radius: 0.025 });
  const document = { ...sheet, title: 'Ball: hand from its robot description', object: { ...sheet.object, pose: { ...sheet.object.pose, position: [0, 0, 0.09] } } };
  const created = await page.request.post(`${baseUrl()}/api/sheets`, { data: { teamId: currentTeam, title: document.title, document } });
  expect(created.status()).toBe(201);
  sheetId = (await created.json()).sheetId;
}, 60_000);

afterAll(async () => {
  await browser?.close();
  if (sheetId) await deleteCreatedSheets([sheetId]);
});

describe('importing the hand from a URDF file', () => {
  it('reads the example file, assigns roles, previews the solved hand in the 3D view, accepts, and saves it as a revision', async () => {
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    expect(await page.locator('[data-finger]').count()).toBe(2);
    await page.getByTestId('urdf-open').click();
    const dialog = page.getByTestId('urdf-dialog');
    await dialog.getByTestId('urdf-file').setInputFiles(URDF);

    // The palm is found below the bench mount; the camera's chain has no revolute joint and says so.
    expect(await dialog.getByTestId('urdf-palm').inputValue()).toBe('palm');
    expect(await dialog.locator('[data-urdf-chain]').evaluateAll((items) => items.map((item) => item.getAttribute('data-urdf-chain')))).toEqual([
      'palm-camera',
      'north-roller',
      'southwest-roller',
      'southeast-roller',
    ]);
    expect(await dialog.locator('[data-urdf-chain="palm-camera"]').innerText()).toMatch(/cannot be a finger: the chain to "palm-camera" has no revolute joint/);

    // The north finger's pivot, composed from the file's origins, in the palm frame (the file's design: 37 mm out, 90 mm up).
    const north = dialog.locator('[data-urdf-chain="north-roller"]');
    expect(await north.locator('[data-urdf-joint="north-pivot"]').innerText()).toMatch(/0\.000, -1\.000, 0\.000\s+0\.00, 37\.00, 90\.00/);

    for (const finger of ['north', 'southwest', 'southeast']) {
      const chain = dialog.locator(`[data-urdf-chain="${finger}-roller"]`);
      await chain.getByLabel('finger').fill(finger);
      await chain.getByLabel(`role of ${finger}-base`).selectOption('base');
      await chain.getByLabel(`role of ${finger}-pivot`).selectOption('pivot');
      await chain.getByLabel(`role of ${finger}-roll`).selectOption('roll');
    }
    // A wrong role shows in the preview's solve, then is put right.
    await north.getByLabel('role of north-pivot').selectOption('other');
    await north.getByLabel('role of north-pivot').selectOption('pivot');

    const preview = dialog.getByTestId('urdf-preview');
    await expect.poll(() => preview.getAttribute('data-state'), { timeout: 20_000 }).toBe('solved');
    expect(await dialog.getByTestId('urdf-preview-summary').innerText()).toMatch(/3 fingers/);
    await preview.getByTestId('scene-view').waitFor();
    await saveDialog('urdf-import-preview');

    await dialog.getByTestId('urdf-accept').click();
    await dialog.waitFor({ state: 'hidden' });
    await expect.poll(() => page.locator('[data-finger]').count()).toBe(3);
    expect(await page.locator('[data-finger="0"] summary').innerText()).toMatch(/Finger 1: north · 3 joints · sphere roller/);
    expect(await page.locator('[data-quantity="hand.fingers[0].joints[1].point[1]"] input').inputValue()).toBe('0.037');
    await saveScreenshot(page, 'urdf-import-accepted');

    const before = Number(await page.locator('[data-revision]').innerText());
    await page.getByLabel('revision message').fill('Hand from the TR-3 robot description');
    await page.getByRole('button', { name: 'Save revision' }).click();
    await page.waitForFunction((n) => document.querySelector('[data-revision]')?.textContent === String(n), before + 1);
    const saved = await (await page.request.get(`${baseUrl()}/api/sheets/${sheetId}/export?format=json`)).json();
    const hand = saved.hand;
    expect(hand.name).toBe('Tri roller hand TR-3');
    expect(hand.fingers.map((f: { name: string }) => f.name)).toEqual(['north', 'southwest', 'southeast']);
  });

  it('shows where a broken file is broken', async () => {
    await page.getByTestId('urdf-open').click();
    const dialog = page.getByTestId('urdf-dialog');
    const broken = readFileSync(URDF, 'utf8').replace('<parent link="north-bracket"/>', '<parent link="north-bracket">');
    await dialog.getByTestId('urdf-file').setInputFiles({ name: 'broken.urdf', mimeType: 'application/xml', buffer: Buffer.from(broken) });
    const errors = dialog.getByTestId('urdf-errors');
    await errors.waitFor();
    expect(await errors.innerText()).toMatch(/line \d+, column \d+ · \(file\): not well-formed XML/);
    expect(await dialog.getByTestId('urdf-accept').isDisabled()).toBe(true);

    const misspelt = readFileSync(URDF, 'utf8').replace('<child link="north-proximal"/>', '<child link="north-proximl"/>');
    await dialog.getByTestId('urdf-file').setInputFiles({ name: 'misspelt.urdf', mimeType: 'application/xml', buffer: Buffer.from(misspelt) });
    await expect.poll(() => errors.innerText()).toMatch(/line 36, column 3 · robot\/joint "north-base"\/child: child link "north-proximl" is not a link of this robot/);
    await saveDialog('urdf-import-error');
  });

  it('keeps Accept off while the preview lists what the sheet would refuse: a joint limit beyond the sheet\'s ±1000 rad', async () => {
    const dialog = page.getByTestId('urdf-dialog');
    const wide = readFileSync(URDF, 'utf8').replace('lower="-0.6109"', 'lower="-5000"');
    await dialog.getByTestId('urdf-file').setInputFiles({ name: 'wide-limits.urdf', mimeType: 'application/xml', buffer: Buffer.from(wide) });
    const preview = dialog.getByTestId('urdf-preview');
    await expect.poll(() => preview.getAttribute('data-state'), { timeout: 20_000 }).toBe('refused');
    expect(await preview.getByRole('alert').innerText()).toMatch(/limits\.min/);
    expect(await dialog.getByTestId('urdf-accept').isDisabled()).toBe(true);

    await dialog.getByTestId('urdf-file').setInputFiles(URDF);
    await expect.poll(() => preview.getAttribute('data-state'), { timeout: 20_000 }).toBe('solved');
    expect(await dialog.getByTestId('urdf-accept').isDisabled()).toBe(false);
  });
});
