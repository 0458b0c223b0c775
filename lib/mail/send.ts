import 'server-only';
import nodemailer, { type Transporter } from 'nodemailer';
import { mailFrom, smtpSinkPort } from '../env';

let cached: { key: string; transport: Transporter } | undefined;

/**
 * The outgoing transport: a real relay when SMTP_HOST is set, otherwise the
 * app's own local sink on 127.0.0.1:SMTP_SINK_PORT (see lib/mail/sink.ts).
 */
export function getTransport(): Transporter {
  const host = process.env.SMTP_HOST;
  const key = host ? `${host}:${process.env.SMTP_PORT}:${process.env.SMTP_USER}` : `sink:${smtpSinkPort()}`;
  if (cached?.key === key) return cached.transport;
  const transport = host
    ? nodemailer.createTransport({
        host,
        port: Number(process.env.SMTP_PORT || 587),
        secure: Number(process.env.SMTP_PORT) === 465,
        auth: process.env.SMTP_USER ? { user: process.env.SMTP_USER, pass: process.env.SMTP_PASS ?? '' } : undefined,
      })
    : nodemailer.createTransport({ host: '127.0.0.1', port: smtpSinkPort(), secure: false, ignoreTLS: true });
  cached = { key, transport };
  return transport;
}

export type OutgoingMail = { to: string; subject: string; text: string; html?: string };

export async function sendMail(mail: OutgoingMail): Promise<void> {
  await getTransport().sendMail({ from: mailFrom(), ...mail });
}
