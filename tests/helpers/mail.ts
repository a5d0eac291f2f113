import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { and, desc, eq, type SQL } from 'drizzle-orm';
import { simpleParser } from 'mailparser';
import { mailOutbox, type OutboxMail } from '../../src/db/schema';
import { getDatabase } from '../../src/lib/server/database';
import { startFakeSmtp, useFakeSmtp, type FakeSmtpServer } from '../../src/lib/server/fake-smtp';
import { makeTempDir } from './temp';

export interface TestOutbox extends FakeSmtpServer {
  /** The lines the fake server printed to its log, oldest first. */
  log: string[];
}

/** Starts the fake SMTP server on a free loopback port with its own mailbox folder and a captured log, and points sendMail at it. */
export async function startTestOutbox(): Promise<TestOutbox> {
  const log: string[] = [];
  const server = await startFakeSmtp(await getDatabase(), { mailboxDir: makeTempDir('slipless-mailbox-'), log: (line) => log.push(line) });
  useFakeSmtp(server);
  return Object.assign(server, { log });
}

/** The newest mail caught for `to` (with `subject`, when given), waiting up to `timeoutMs` for one to arrive. */
export async function waitForMail(to: string, { timeoutMs = 5_000, subject }: { timeoutMs?: number; subject?: string } = {}): Promise<OutboxMail> {
  const database = await getDatabase();
  const deadline = Date.now() + timeoutMs;
  const where: SQL[] = [eq(mailOutbox.to, to)];
  if (subject !== undefined) where.push(eq(mailOutbox.subject, subject));
  for (;;) {
    const [mail] = await database.db.select().from(mailOutbox).where(and(...where)).orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id)).limit(1);
    if (mail) return mail;
    if (Date.now() > deadline) throw new Error(`No mail for ${to}${subject ? ` about "${subject}"` : ''} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

/** Every mail caught for `to`, oldest first. */
export async function mailsTo(to: string): Promise<OutboxMail[]> {
  const database = await getDatabase();
  return database.db.select().from(mailOutbox).where(eq(mailOutbox.to, to)).orderBy(mailOutbox.createdAt);
}

/**
 * The newest mail to `to` (with `subject`, when given) that a separately running app wrote into
 * the mailbox folder `dir`, waiting up to `timeoutMs`; the browser tests read mail this way.
 */
export async function waitForMailboxMail(
  dir: string,
  to: string,
  { timeoutMs = 10_000, subject }: { timeoutMs?: number; subject?: string } = {},
): Promise<{ subject: string; text: string }> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    // File names start with the time the mail arrived, so the newest sorts last.
    const names = readdirSync(dir).filter((name) => name.endsWith('.eml')).sort().reverse();
    for (const name of names) {
      const mail = await simpleParser(readFileSync(join(dir, name)));
      const recipients = [mail.to ?? []].flat().flatMap((address) => address.value.map((v) => v.address?.toLowerCase()));
      if (recipients.includes(to.toLowerCase()) && (subject === undefined || mail.subject === subject)) {
        return { subject: mail.subject ?? '', text: mail.text ?? '' };
      }
    }
    if (Date.now() > deadline) throw new Error(`No mail for ${to}${subject ? ` about "${subject}"` : ''} in ${dir} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** The first link in a mail's text whose path starts with `pathPrefix`. */
export function linkIn(text: string, pathPrefix: string): URL {
  const href = text.match(/https?:\/\/\S+/g)?.find((candidate) => new URL(candidate).pathname.startsWith(pathPrefix));
  if (!href) throw new Error(`No ${pathPrefix} link in:\n${text}`);
  return new URL(href);
}
