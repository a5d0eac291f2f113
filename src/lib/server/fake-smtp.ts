import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { Database } from '../../db';
import { mailOutbox } from '../../db/schema';

/** Set (to "1") while sendMail talks to the local fake server rather than a relay the operator configured. */
export const FAKE_SMTP_FLAG = 'SLIPLESS_FAKE_SMTP';

const MAX_MESSAGE_BYTES = 2 * 1024 * 1024;

export interface FakeSmtpServer {
  host: string;
  port: number;
  close(): Promise<void>;
}

/**
 * Starts an SMTP server on 127.0.0.1 that accepts any message without authentication, parses it
 * and keeps it in `mail_outbox`, so development and demo installs can show mail without a relay.
 * `port` 0 picks a free one.
 */
export function startFakeSmtp(database: Database, { port = 0 }: { port?: number } = {}): Promise<FakeSmtpServer> {
  const host = '127.0.0.1';
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: 'Slipless local outbox',
    onData(stream, session, callback) {
      const recipients = session.envelope.rcptTo.map((r) => r.address).join(', ');
      simpleParser(stream)
        .then((mail) =>
          database.write((db) =>
            db.insert(mailOutbox).values({
              to: recipients,
              subject: mail.subject ?? '',
              text: mail.text ?? '',
              html: typeof mail.html === 'string' ? mail.html : null,
            }),
          ),
        )
        .then(() => callback(), (error: Error) => callback(error));
    },
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      server.off('error', reject);
      resolve({
        host,
        port: (server.server.address() as AddressInfo).port,
        close: () => new Promise((done) => server.close(() => done())),
      });
    });
  });
}

/** Points sendMail (src/lib/server/email.ts) at a running fake server and marks the outbox as in use. */
export function useFakeSmtp(server: Pick<FakeSmtpServer, 'host' | 'port'>): void {
  process.env.SMTP_HOST = server.host;
  process.env.SMTP_PORT = String(server.port);
  process.env.SMTP_SECURE = 'false';
  delete process.env.SMTP_USER;
  delete process.env.SMTP_PASSWORD;
  process.env[FAKE_SMTP_FLAG] = '1';
}
