import { desc, eq } from 'drizzle-orm';
import { mailOutbox, type OutboxMail } from '../../src/db/schema';
import { getDatabase } from '../../src/lib/server/database';
import { startFakeSmtp, useFakeSmtp, type FakeSmtpServer } from '../../src/lib/server/fake-smtp';

/** Starts the fake SMTP server on a free loopback port and points sendMail at it. */
export async function startTestOutbox(): Promise<FakeSmtpServer> {
  const server = await startFakeSmtp(await getDatabase());
  useFakeSmtp(server);
  return server;
}

/** The newest mail caught for `to`, waiting up to `timeoutMs` for one to arrive. */
export async function waitForMail(to: string, { timeoutMs = 5_000 } = {}): Promise<OutboxMail> {
  const database = await getDatabase();
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const [mail] = await database.db.select().from(mailOutbox).where(eq(mailOutbox.to, to)).orderBy(desc(mailOutbox.createdAt)).limit(1);
    if (mail) return mail;
    if (Date.now() > deadline) throw new Error(`No mail for ${to} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

/** Every mail caught for `to`, oldest first. */
export async function mailsTo(to: string): Promise<OutboxMail[]> {
  const database = await getDatabase();
  return database.db.select().from(mailOutbox).where(eq(mailOutbox.to, to)).orderBy(mailOutbox.createdAt);
}

/** The first link in a mail's text whose path starts with `pathPrefix`. */
export function linkIn(text: string, pathPrefix: string): URL {
  const href = text.match(/https?:\/\/\S+/g)?.find((candidate) => new URL(candidate).pathname.startsWith(pathPrefix));
  if (!href) throw new Error(`No ${pathPrefix} link in:\n${text}`);
  return new URL(href);
}
