import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { and, desc, eq, type SQL } from 'drizzle-orm';
import { simpleParser } from 'mailparser';
import { mailOutbox, type OutboxMail } from '../../src/db/schema';
import { vi } from 'vitest';
import { getDatabase } from '../../src/lib/server/database';
import { mailboxDir } from '../../src/lib/server/local-mailbox';

export interface TestOutbox {
  /** Absolute path of the folder that receives one .eml file per mail (MAILBOX_DIR, a temp folder set in vitest.config.ts). */
  mailboxDir: string;
  /** The mail entries the app printed to its log, oldest first. */
  log: string[];
  /** Stops capturing the log. */
  close(): Promise<void>;
}

/** Captures the local mailbox's log entries (no relay is set in the tests, so every mail goes to the mailbox). */
export async function startTestOutbox(): Promise<TestOutbox> {
  const log: string[] = [];
  const print = console.log;
  const spy = vi.spyOn(console, 'log').mockImplementation((...args: unknown[]) => {
    const line = args.map(String).join(' ');
    if (line.startsWith('Mail to ')) log.push(line);
    else print(...args);
  });
  return { mailboxDir: mailboxDir(process.env.MAILBOX_DIR), log, close: async () => spy.mockRestore() };
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
