import { randomUUID } from 'node:crypto';
import { createReadStream, createWriteStream } from 'node:fs';
import { mkdir, rename } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import { join, resolve } from 'node:path';
import type { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { DEFAULT_MAILBOX_DIR } from '../../consts';
import type { Database } from '../../db';
import { mailOutbox } from '../../db/schema';

/** Set (to "1") while sendMail talks to the local fake server rather than a relay the operator configured. */
export const FAKE_SMTP_FLAG = 'SLIPLESS_FAKE_SMTP';

const MAX_MESSAGE_BYTES = 2 * 1024 * 1024;

export interface FakeSmtpServer {
  host: string;
  port: number;
  /** Absolute path of the folder that receives one .eml file per mail. */
  mailboxDir: string;
  close(): Promise<void>;
}

export interface FakeSmtpOptions {
  /** 0 (the default) picks a free port. */
  port?: number;
  /** Defaults to MAILBOX_DIR, else data/mail. */
  mailboxDir?: string;
  /** Receives one entry per mail: recipient, subject, links and the saved file; defaults to the server log. */
  log?: (entry: string) => void;
}

/** The mailbox folder named by MAILBOX_DIR, else the default one, as an absolute path. */
export function mailboxDirFromEnv(): string {
  return resolve(process.env.MAILBOX_DIR?.trim() || DEFAULT_MAILBOX_DIR);
}

/** A file name that sorts by arrival and says whom the mail is for, without characters a file system may refuse. */
function mailFileName(recipients: string): string {
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const who = recipients.replace(/[^\w@.+-]+/g, '_').slice(0, 100);
  return `${stamp}-${who}-${randomUUID().slice(0, 8)}.eml`;
}

/**
 * Starts an SMTP server on 127.0.0.1 that accepts any message without authentication, for
 * installs without a relay. Mail often carries sign-in and reset links, so it goes only where
 * whoever runs the server reads it: the server log and an .eml file in the mailbox folder
 * (readable by the server's user only). The copy kept in `mail_outbox` is for the tests; no page
 * or route reads that table.
 */
export async function startFakeSmtp(database: Database, options: FakeSmtpOptions = {}): Promise<FakeSmtpServer> {
  const host = '127.0.0.1';
  const mailboxDir = resolve(options.mailboxDir ?? mailboxDirFromEnv());
  const log = options.log ?? ((entry: string) => console.log(entry));
  await mkdir(mailboxDir, { recursive: true, mode: 0o700 });

  async function keep(message: Readable, recipients: string): Promise<void> {
    const file = join(mailboxDir, mailFileName(recipients));
    // Written under another name first, so whoever watches the folder never opens half a mail.
    const partial = `${file}.part`;
    await pipeline(message, createWriteStream(partial, { mode: 0o600 }));
    await rename(partial, file);
    const mail = await simpleParser(createReadStream(file));
    const subject = mail.subject ?? '';
    const text = mail.text ?? '';
    await database.write((db) =>
      db.insert(mailOutbox).values({ to: recipients, subject, text, html: typeof mail.html === 'string' ? mail.html : null }),
    );
    const links = [...new Set(text.match(/https?:\/\/[^\s<>"')]+/g) ?? [])];
    log([`Mail to ${recipients}: ${subject || '(no subject)'}`, ...links.map((link) => `  ${link}`), `  saved as ${file}`].join('\n'));
  }

  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: 'Slipless local mailbox',
    onData(stream, session, callback) {
      const recipients = session.envelope.rcptTo.map((r) => r.address).join(', ');
      keep(stream, recipients).then(() => callback(), (error: Error) => callback(error));
    },
  });
  return new Promise((resolveServer, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 0, host, () => {
      server.off('error', reject);
      log(`Local mailbox: no mail relay is configured, so nothing is delivered; each mail is printed here and saved in ${mailboxDir}.`);
      resolveServer({
        host,
        port: (server.server.address() as AddressInfo).port,
        mailboxDir,
        close: () => new Promise((done) => server.close(() => done())),
      });
    });
  });
}

/** Points sendMail (src/lib/server/email.ts) at a running fake server. */
export function useFakeSmtp(server: Pick<FakeSmtpServer, 'host' | 'port'>): void {
  process.env.SMTP_HOST = server.host;
  process.env.SMTP_PORT = String(server.port);
  process.env.SMTP_SECURE = 'false';
  delete process.env.SMTP_USER;
  delete process.env.SMTP_PASSWORD;
  process.env[FAKE_SMTP_FLAG] = '1';
}
