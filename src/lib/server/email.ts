import nodemailer, { type Transporter } from 'nodemailer';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

let transporter: Transporter | undefined;

/** SMTP settings from the environment; the start command points these at the local fake server when none are given. */
export function smtpSettings() {
  return {
    host: process.env.SMTP_HOST ?? '127.0.0.1',
    port: Number(process.env.SMTP_PORT ?? 2525),
    secure: process.env.SMTP_SECURE === 'true',
    auth: process.env.SMTP_USER ? { user: process.env.SMTP_USER, pass: process.env.SMTP_PASSWORD ?? '' } : undefined,
    from: process.env.SMTP_FROM ?? 'Slipless <no-reply@slipless.example>',
  };
}

/** Sends one e-mail through the configured SMTP relay. */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  const { from, ...transport } = smtpSettings();
  transporter ??= nodemailer.createTransport({ ...transport, ignoreTLS: !transport.secure && transport.host === '127.0.0.1' });
  await transporter.sendMail({ from, ...mail });
}
