import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { simpleParser } from 'mailparser';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getDatabase } from '../../../src/lib/server/database';
import { identityForUser } from '../../../src/lib/server/identity';
import { createInvitation, revokeInvitation } from '../../../src/lib/server/invitations';
import { GET as authGet, POST as authPost } from '../../../src/pages/api/auth/[...auth]';
import { addTestMember, cookieJar, ORIGIN } from '../../helpers/api-context';
import { linkIn, startTestOutbox, waitForMail, type TestOutbox } from '../../helpers/mail';

let outbox: TestOutbox;

beforeAll(async () => {
  outbox = await startTestOutbox();
});

afterAll(async () => {
  await outbox?.close();
});

/** Asks Auth.js for an e-mail sign-in link for `email`, as anyone on the sign-in page can. */
async function requestSignInLink(email: string): Promise<void> {
  const csrf = await authGet({ request: new Request(`${ORIGIN}/api/auth/csrf`), cookies: cookieJar(), clientAddress: '127.0.0.1' } as never);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = csrf.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const response = await authPost({
    request: new Request(`${ORIGIN}/api/auth/signin/nodemailer`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', cookie, 'x-auth-return-redirect': '1' },
      body: new URLSearchParams({ email, csrfToken, callbackUrl: `${ORIGIN}/` }),
    }),
    cookies: cookieJar(),
    clientAddress: '127.0.0.1',
  } as never);
  expect(response.status).toBe(200);
}

/** Every source file of the app (pages, routes, islands, server modules). */
function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    return statSync(path).isDirectory() ? sourceFiles(path) : /\.(ts|tsx|astro|mjs)$/.test(name) ? [path] : [];
  });
}

describe('nobody reads mail addressed to someone else', () => {
  it('keeps a sign-in link for a person whose invitation the owner withdrew away from that owner: only the operator mailbox and log have it', async () => {
    const database = await getDatabase();
    const owner = await addTestMember('owner');
    const person = await addTestMember('editor');
    const ownerIdentity = (await identityForUser(database, owner.userId, Date.now()))!;
    const invited = await createInvitation(database, { teamId: owner.teamId, inviter: ownerIdentity.user, email: person.email, role: 'viewer', origin: ORIGIN });
    expect(invited.ok).toBe(true);
    if (!invited.ok) return;
    expect((await revokeInvitation(database, { teamId: owner.teamId, invitationId: invited.value.id, actorId: owner.userId })).ok).toBe(true);

    await requestSignInLink(person.email);
    const mail = await waitForMail(person.email, { subject: 'Your Slipless sign-in link' });
    const link = linkIn(mail.text, '/api/auth/callback/nodemailer').href;

    // The mail table is written by the local mailbox and read by nothing in the app, so no page,
    // route or island can show a team owner (or anyone) mail addressed to another person.
    const readers = sourceFiles('src')
      .filter((file) => /mailOutbox|mail_outbox/.test(readFileSync(file, 'utf8')))
      .map((file) => relative('src', file).replaceAll('\\', '/'))
      .sort();
    expect(readers).toEqual(['db/schema.ts', 'lib/server/local-mailbox.ts']);

    const saved = readdirSync(outbox.mailboxDir).filter((name) => name.endsWith('.eml') && name.includes(person.email));
    const parsed = await Promise.all(saved.map(async (name) => simpleParser(readFileSync(join(outbox.mailboxDir, name)))));
    expect(parsed.some((eml) => eml.text?.includes(link))).toBe(true);
    expect(outbox.log.some((line) => line.includes(person.email) && line.includes(link))).toBe(true);
  });
});
