import { MAILBOX_DIR, SMTP_FROM, SMTP_HOST, SMTP_PASSWORD, SMTP_PORT, SMTP_SECURE, SMTP_USER } from 'astro:env/server';
import nodemailer, { type Transporter } from 'nodemailer';
import { getDatabase } from './database';
import { keepMail, mailboxDir } from './local-mailbox';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

const DEFAULT_FROM = 'Slipless <no-reply@slipless.example>';

/**
 * The relay named by SMTP_HOST (SMTP_PORT, SMTP_SECURE, SMTP_USER, SMTP_PASSWORD), or without one
 * a transport that only renders each message, which `sendMail` then keeps in the local mailbox.
 */
function createTransporter(): Transporter {
  const host = SMTP_HOST?.trim();
  if (!host) return nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' });
  return nodemailer.createTransport({
    host,
    port: SMTP_PORT ?? (SMTP_SECURE ? 465 : 587),
    secure: SMTP_SECURE,
    auth: SMTP_USER ? { user: SMTP_USER, pass: SMTP_PASSWORD ?? '' } : undefined,
  });
}

let transporter: Transporter | undefined;

/** Sends one e-mail through the configured SMTP relay, or keeps it in the local mailbox (log and MAILBOX_DIR) when there is none. */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  transporter ??= createTransporter();
  const sent = await transporter.sendMail({ from: SMTP_FROM || DEFAULT_FROM, ...mail });
  if (SMTP_HOST?.trim()) return;
  const raw = String(sent.message);
  await keepMail(await getDatabase(), { folder: mailboxDir(MAILBOX_DIR), raw, recipients: sent.envelope.to.join(', '), log: (entry) => console.log(entry) });
}
