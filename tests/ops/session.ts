/** What the load and crash scripts share: a signed-in editor on a running app and sheets of their own to save to. */
import { cookieHeader, signInOverHttp } from '../e2e/http-session';

export const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };

export interface EditorSession {
  headers: Record<string, string>;
  teamId: string;
  /** The inputs of the demo team's first sheet: a valid document to save again and again. */
  document: unknown;
}

export async function editorSession(baseUrl: string): Promise<EditorSession> {
  const { jar } = await signInOverHttp(baseUrl, baseUrl, EDITOR.email, EDITOR.password);
  const headers = { origin: baseUrl, cookie: cookieHeader(jar), 'content-type': 'application/json' };
  const me = (await (await fetch(`${baseUrl}/api/me`, { headers })).json()) as { currentTeam: string };
  const list = (await (await fetch(`${baseUrl}/api/sheets`, { headers })).json()) as { items: { id: string }[] };
  const detail = (await (await fetch(`${baseUrl}/api/sheets/${list.items[0].id}`, { headers })).json()) as { revision: { inputs: unknown } };
  return { headers, teamId: me.currentTeam, document: detail.revision.inputs };
}

/** Creates `count` sheets (revision 1 each) for writers that must never race each other. */
export async function createSheets(baseUrl: string, session: EditorSession, count: number, prefix: string): Promise<string[]> {
  const ids: string[] = [];
  for (let i = 0; i < count; i++) {
    const response = await fetch(`${baseUrl}/api/sheets`, {
      method: 'POST',
      headers: session.headers,
      body: JSON.stringify({ teamId: session.teamId, title: `${prefix} ${i}`, document: session.document }),
    });
    if (response.status !== 201) throw new Error(`creating a sheet answered ${response.status}: ${await response.text()}`);
    ids.push(((await response.json()) as { sheetId: string }).sheetId);
  }
  return ids;
}
