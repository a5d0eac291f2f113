import type { Page } from 'playwright-core';
import { baseUrl } from './browser';

/**
 * Saves a copy of the demo sheet titled `demoTitle` into the signed-in user's team, with `edit` applied to its
 * document first, and answers the new sheet's id. Browser tests change copies because others read the demo sheets.
 */
export async function copyDemoSheet(page: Page, demoTitle: string, title: string, edit: (document: Record<string, any>) => void): Promise<string> {
  const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
  const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}&q=${encodeURIComponent(demoTitle.split(':')[0]!)}`)).json();
  const demoId = list.items.find((s: { title: string }) => s.title === demoTitle).id;
  const demo = await (await page.request.get(`${baseUrl()}/api/sheets/${demoId}`)).json();
  const document = structuredClone(demo.revision.inputs);
  document.title = title;
  edit(document);
  const response = await page.request.post(`${baseUrl()}/api/sheets`, {
    data: { teamId: me.currentTeam, title, tags: ['browser-test'], document, message: `Copied for the browser test "${title}"` },
  });
  if (response.status() !== 201) throw new Error(`copying ${demoTitle} answered ${response.status()}`);
  return (await response.json()).sheetId;
}
