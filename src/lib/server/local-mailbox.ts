import { randomUUID } from 'node:crypto';
import { mkdir, rename, writeFile } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { simpleParser } from 'mailparser';
import { DEFAULT_MAILBOX_DIR } from '../../consts';
import type { Database } from '../../db';
import { mailOutbox } from '../../db/schema';

/** The mailbox folder named by MAILBOX_DIR (`configured`), else the default one, as an absolute path. */
export function mailboxDir(configured: string | undefined): string {
  return resolve(configured?.trim() || DEFAULT_MAILBOX_DIR);
}

/** A file name that sorts by arrival and says whom the mail is for, without characters a file system may refuse. */
function mailFileName(recipients: string): string {
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const who = recipients.replace(/[^\w@.+-]+/g, '_').slice(0, 100);
  return `${stamp}-${who}-${randomUUID().slice(0, 8)}.eml`;
}

/**
 * Keeps one mail of an install without a relay. Mail often carries sign-in and reset links, so it
 * goes only where whoever runs the server reads it: the server log (`log`) and an .eml file in
 * `folder` (readable by the server's user only). The copy kept in `mail_outbox` is for the tests;
 * no page or route reads that table.
 */
export async function keepMail(database: Database, { folder, raw, recipients, log }: { folder: string; raw: string; recipients: string; log: (entry: string) => void }): Promise<void> {
  await mkdir(folder, { recursive: true, mode: 0o700 });
  const file = join(folder, mailFileName(recipients));
  // Written under another name first, so whoever watches the folder never opens half a mail.
  const partial = `${file}.part`;
  await writeFile(partial, raw, { mode: 0o600 });
  await rename(partial, file);
  const mail = await simpleParser(raw);
  const subject = mail.subject ?? '';
  const text = mail.text ?? '';
  await database.write((db) => db.insert(mailOutbox).values({ to: recipients, subject, text, html: typeof mail.html === 'string' ? mail.html : null }));
  const links = [...new Set(text.match(/https?:\/\/[^\s<>"')]+/g) ?? [])];
  log([`Mail to ${recipients}: ${subject || '(no subject)'}`, ...links.map((link) => `  ${link}`), `  saved as ${file}`].join('\n'));
}

/** The start-up line of an install without a relay, so the operator knows where mail goes. */
export function localMailboxNotice(folder: string): string {
  return `Local mailbox: no mail relay is configured, so nothing is delivered; each mail is printed here and saved in ${folder}.`;
}
