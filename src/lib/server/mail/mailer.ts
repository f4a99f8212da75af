/**
 * Outgoing mail through nodemailer to SMTP_URL. Locally and in tests SMTP_URL points at the fake SMTP
 * server on loopback (scripts/fake-smtp.ts), which stores every mail in the dev_mail table.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { serverEnv } from '../env.ts';

let transporter: Transporter | undefined;

function transport(): Transporter {
  if (!transporter) {
    const url = serverEnv().smtpUrl;
    const loopback = /^smtps?:\/\/(127\.0\.0\.1|localhost|\[::1\])(:|\/|$)/.test(url);
    transporter = loopback ? nodemailer.createTransport({ url, ignoreTLS: true } as never) : nodemailer.createTransport(url);
  }
  return transporter;
}

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export async function sendMail(mail: OutgoingMail): Promise<void> {
  await transport().sendMail({ from: serverEnv().mailFrom, ...mail });
}
