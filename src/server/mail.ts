import 'server-only';
import nodemailer, { type Transporter } from 'nodemailer';
import { env } from './env';

/**
 * Outgoing mail through any SMTP server named by SMTP_URL (locally the catcher started by the
 * scripts). Digests, alerts and sign-in links all go through `sendMail`.
 */

let transport: Transporter | undefined;

export function mailTransport(): Transporter {
  transport ??= nodemailer.createTransport(env().SMTP_URL, { from: env().MAIL_FROM });
  return transport;
}

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  headers?: Record<string, string>;
}

export async function sendMail(mail: OutgoingMail): Promise<{ messageId: string }> {
  const info = await mailTransport().sendMail({ from: env().MAIL_FROM, ...mail });
  return { messageId: info.messageId };
}

export async function checkMail(): Promise<void> {
  await mailTransport().verify();
}
