import nodemailer, { type Transporter } from 'nodemailer';
import { getDatabase } from './database';
import { FAKE_SMTP_FLAG, startFakeSmtp, useFakeSmtp, type FakeSmtpServer } from './fake-smtp';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

const DEFAULT_FROM = 'Slipless <no-reply@slipless.example>';

/** SMTP settings from the environment (SMTP_HOST, SMTP_PORT, SMTP_SECURE, SMTP_USER, SMTP_PASSWORD, SMTP_FROM). */
export function smtpSettings() {
  const secure = process.env.SMTP_SECURE === 'true';
  return {
    transport: {
      host: process.env.SMTP_HOST ?? '',
      port: Number(process.env.SMTP_PORT || (secure ? 465 : 587)),
      secure,
      auth: process.env.SMTP_USER ? { user: process.env.SMTP_USER, pass: process.env.SMTP_PASSWORD ?? '' } : undefined,
    },
    from: process.env.SMTP_FROM || DEFAULT_FROM,
  };
}

let inProcessFake: Promise<FakeSmtpServer> | undefined;

/**
 * The start command runs the fake server before the app loads; the development server does not,
 * so without any relay the first mail starts one in this process.
 */
function ensureRelay(): Promise<unknown> {
  if (process.env.SMTP_HOST) return Promise.resolve();
  inProcessFake ??= getDatabase()
    .then((database) => startFakeSmtp(database))
    .then((server) => {
      useFakeSmtp(server);
      return server;
    });
  return inProcessFake;
}

const transporters = new Map<string, Transporter>();

/** One transporter per distinct relay, so a changed SMTP_PORT (tests, restarts of the fake) takes effect. */
function transporterFor(transport: ReturnType<typeof smtpSettings>['transport']): Transporter {
  const key = JSON.stringify(transport);
  let transporter = transporters.get(key);
  if (!transporter) {
    transporter = nodemailer.createTransport({ ...transport, ignoreTLS: process.env[FAKE_SMTP_FLAG] === '1' });
    transporters.set(key, transporter);
  }
  return transporter;
}

/** Sends one e-mail through the configured SMTP relay (or the local fake one). */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  await ensureRelay();
  const { transport, from } = smtpSettings();
  await transporterFor(transport).sendMail({ from, ...mail });
}
