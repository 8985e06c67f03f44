/**
 * Outgoing mail through nodemailer. With SMTP_URL set, messages go to that SMTP server. Without it,
 * a local fake builds the very same RFC 5322 message (nodemailer's stream transport) and keeps it in
 * the sent_mails table, where admins read it on the outbox page and tests read the links.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { SentMail } from '@/models';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
}

export const MAIL_FROM = process.env.MAIL_FROM || 'Hotlap <no-reply@hotlap.local>';

export function mailTransportKind(): 'smtp' | 'fake' {
  return process.env.SMTP_URL ? 'smtp' : 'fake';
}

let transporter: Transporter | null = null;
let transporterUrl: string | undefined;

function getTransporter(): Transporter {
  const url = process.env.SMTP_URL;
  if (!transporter || transporterUrl !== url) {
    transporter = url
      ? nodemailer.createTransport(url)
      : nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' });
    transporterUrl = url;
  }
  return transporter;
}

export async function sendMail(message: MailMessage): Promise<SentMail> {
  const kind = mailTransportKind();
  const info = await getTransporter().sendMail({ from: MAIL_FROM, ...message });
  const raw = kind === 'fake' && Buffer.isBuffer((info as { message?: unknown }).message)
    ? ((info as unknown as { message: Buffer }).message).toString('utf8')
    : null;
  return SentMail.create({
    to: message.to,
    subject: message.subject,
    text: message.text,
    html: message.html,
    transport: kind,
    messageId: info.messageId ?? null,
    raw,
  });
}

export function appUrl(path = '/'): string {
  const base = (process.env.APP_URL || process.env.NEXTAUTH_URL || 'http://localhost:3000').replace(/\/$/, '');
  return `${base}${path}`;
}

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** A plain message with one call-to-action link, as text and as simple HTML. */
export function linkMail(to: string, subject: string, intro: string, linkLabel: string, link: string, outro: string): MailMessage {
  return {
    to,
    subject,
    text: `${intro}\n\n${linkLabel}: ${link}\n\n${outro}\n\n— Hotlap`,
    html: `<p>${escapeHtml(intro)}</p><p><a href="${escapeHtml(link)}">${escapeHtml(linkLabel)}</a></p><p>${escapeHtml(outro)}</p><p>— Hotlap</p>`,
  };
}
