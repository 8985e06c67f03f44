/**
 * Outgoing mail through an outbox. `sendMail` writes a sent_mails row — in the caller's transaction
 * when it passes one, so the mail exists exactly when the change that causes it commits — and
 * delivery happens after commit, with retries and backoff. A delivery failure is recorded on the row
 * (attempts, last error, next attempt) and never reaches the action that asked for the mail.
 *
 * With SMTP_URL set, messages go to that SMTP server; the stored text and html have their token
 * links removed (a reader of the table cannot use them) and the deliverable body is kept sealed
 * with a key derived from NEXTAUTH_SECRET until it is sent, then dropped. Without SMTP_URL a local
 * fake builds the very same RFC 5322 message (nodemailer's stream transport) and keeps it in the
 * row, where admins read it on the outbox page and tests read the links.
 */
import crypto from 'node:crypto';
import nodemailer, { type Transporter } from 'nodemailer';
import { Op, type Transaction } from 'sequelize';
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

/**
 * The admin outbox shows message bodies only with the fake transport (a developer's machine): with
 * real SMTP the mail went to a person's inbox and its body is theirs, not the admins'.
 */
export function outboxBodiesVisible(): boolean {
  return mailTransportKind() === 'fake';
}

/** Delivery attempts before a message is marked failed (the last one ~1 h after the first). */
export const MAIL_MAX_ATTEMPTS = 8;
/** Wait before attempt n+1: base × 2^(n-1), capped. MAIL_RETRY_BASE_MS shortens it (tests). */
function retryDelayMs(attempts: number): number {
  const base = Number(process.env.MAIL_RETRY_BASE_MS) || 30_000;
  return Math.min(base * 2 ** Math.max(0, attempts - 1), 30 * 60_000);
}
/** How often the sender looks for due messages while the server runs (MAIL_POLL_MS: tests). */
const pollMs = () => Number(process.env.MAIL_POLL_MS) || 15_000;

let transporter: Transporter | null = null;
let transporterUrl: string | undefined;

function getTransporter(kind: 'smtp' | 'fake'): Transporter {
  const url = kind === 'smtp' ? process.env.SMTP_URL : undefined;
  if (!transporter || transporterUrl !== url) {
    transporter = url
      ? // Short timeouts: a dead server is retried later, not waited on for nodemailer's default 2 min.
        nodemailer.createTransport(url, { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 20_000 })
      : nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' });
    transporterUrl = url;
  }
  return transporter;
}

/** Token links (`?token=…`, `&token=…`) with the token removed: what an SMTP-mode record keeps. */
export function redactLinks(s: string): string {
  return s.replace(/([?&](?:amp;)?token=)[^&\s"'<>]+/gi, '$1[removed]');
}

function sealKey(): Buffer {
  const secret = process.env.NEXTAUTH_SECRET;
  if (!secret) throw new Error('NEXTAUTH_SECRET is not set: SMTP mail cannot be kept sealed until it is sent.');
  return crypto.createHash('sha256').update(`hotlap-outbox:${secret}`).digest();
}

function seal(body: { text: string; html: string }): string {
  const iv = crypto.randomBytes(12);
  const cipher = crypto.createCipheriv('aes-256-gcm', sealKey(), iv);
  const data = Buffer.concat([cipher.update(JSON.stringify(body), 'utf8'), cipher.final()]);
  return [iv, cipher.getAuthTag(), data].map((b) => b.toString('base64')).join('.');
}

function unseal(sealed: string): { text: string; html: string } {
  const [iv, tag, data] = sealed.split('.').map((p) => Buffer.from(p, 'base64'));
  const decipher = crypto.createDecipheriv('aes-256-gcm', sealKey(), iv);
  decipher.setAuthTag(tag);
  return JSON.parse(Buffer.concat([decipher.update(data), decipher.final()]).toString('utf8'));
}

/**
 * Queues a message. With `transaction`, the row is part of it and delivery starts after it commits
 * (nothing is sent for a change that rolled back); without, delivery starts at once. Either way the
 * caller never waits for the mail server and never sees its errors.
 */
export async function sendMail(message: MailMessage, opts: { transaction?: Transaction | null } = {}): Promise<SentMail> {
  const kind = mailTransportKind();
  const smtp = kind === 'smtp';
  const row = await SentMail.create(
    {
      to: message.to,
      subject: message.subject,
      text: smtp ? redactLinks(message.text) : message.text,
      html: smtp ? redactLinks(message.html) : message.html,
      transport: kind,
      messageId: null,
      raw: null,
      status: 'pending',
      attempts: 0,
      nextAttemptAt: new Date(),
      sealed: smtp ? seal({ text: message.text, html: message.html }) : null,
    },
    { transaction: opts.transaction ?? undefined },
  );
  if (opts.transaction) opts.transaction.afterCommit(() => kickOutbox());
  else kickOutbox();
  return row;
}

/** One delivery attempt of one row; the row is claimed first so that two senders never both send it. */
async function deliver(id: number, now: Date): Promise<boolean> {
  const row = await SentMail.findByPk(id);
  if (!row || row.status !== 'pending') return false;
  const attempts = row.attempts + 1;
  // Claim: push the next attempt out before sending. A sender that dies mid-send leaves the row
  // pending, and it is tried again when that time comes (no row is left stuck).
  const [claimed] = await SentMail.update(
    { attempts, nextAttemptAt: new Date(now.getTime() + retryDelayMs(attempts)) },
    { where: { id, status: 'pending', attempts: row.attempts } },
  );
  if (claimed !== 1) return false;
  const kind = row.transport === 'smtp' ? 'smtp' : 'fake';
  try {
    if (kind === 'smtp' && !process.env.SMTP_URL) throw new Error('SMTP_URL is not set; the message waits until it is.');
    const body = kind === 'smtp' ? unseal(row.sealed ?? '') : { text: row.text, html: row.html };
    const info = await getTransporter(kind).sendMail({ from: MAIL_FROM, to: row.to, subject: row.subject, ...body });
    const raw = kind === 'fake' && Buffer.isBuffer((info as { message?: unknown }).message) ? (info as unknown as { message: Buffer }).message.toString('utf8') : null;
    await SentMail.update({ status: 'sent', sentAt: new Date(), messageId: info.messageId ?? null, raw, sealed: null, lastError: null, nextAttemptAt: null }, { where: { id } });
    return true;
  } catch (err) {
    const last = attempts >= MAIL_MAX_ATTEMPTS;
    const lastError = String((err as Error)?.message ?? err).slice(0, 500);
    await SentMail.update(
      last ? { status: 'failed', lastError, sealed: null, nextAttemptAt: null } : { lastError },
      { where: { id } },
    );
    if (last) console.error(`Mail ${id} to ${row.to} failed ${attempts} times; giving up:`, lastError);
    return false;
  }
}

let running: Promise<number> | null = null;
let again = false;

/**
 * Delivers every pending message that is due (`now` for tests). Returns how many were sent.
 * One pass at a time per process; a call during a pass makes it run once more afterwards.
 */
export function deliverOutbox(now?: Date): Promise<number> {
  if (running) {
    again = true;
    return running;
  }
  running = (async () => {
    let sent = 0;
    do {
      again = false;
      const at = now ?? new Date();
      const due = await SentMail.findAll({
        where: { status: 'pending', nextAttemptAt: { [Op.lte]: at } },
        attributes: ['id'],
        order: [['id', 'ASC']],
        limit: 100,
      });
      for (const { id } of due) if (await deliver(id, at)) sent++;
    } while (again && !now);
    return sent;
  })().finally(() => {
    running = null;
  });
  return running;
}

function kickOutbox() {
  setImmediate(() => {
    deliverOutbox().catch((err) => console.error('Mail outbox:', err));
  });
}

const globalForMail = globalThis as unknown as { __hotlapOutboxTimer?: NodeJS.Timeout };

/**
 * Server start (instrumentation.ts): sends what a stopped server left pending (at once, whatever
 * its backoff said), then looks for due retries every few seconds for as long as the process runs.
 */
export function startOutbox() {
  if (globalForMail.__hotlapOutboxTimer) return;
  // A (re)start is often the fix (the mail server or its settings changed): try every waiting
  // message now instead of at its backed-off time.
  SentMail.update({ nextAttemptAt: new Date() }, { where: { status: 'pending' } })
    .catch((err) => console.error('Mail outbox:', err))
    .finally(kickOutbox);
  globalForMail.__hotlapOutboxTimer = setInterval(kickOutbox, pollMs());
  globalForMail.__hotlapOutboxTimer.unref();
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
