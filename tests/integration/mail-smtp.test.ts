/**
 * The real SMTP path: with SMTP_URL set, lib/mail queues the message in sent_mails and its sender
 * hands it to an SMTP server (here a local smtp-server instance on 127.0.0.1, the SMTP library from
 * the nodemailer project); the record keeps no working token link.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-smtp-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'mail.sqlite')}`;
process.env.NEXTAUTH_SECRET ||= 'test-secret-for-the-outbox-seal-0123456789';

const received: { from: string; to: string[]; data: string }[] = [];
let server: SMTPServer;

beforeAll(async () => {
  server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    onData(stream, session, callback) {
      let data = '';
      stream.on('data', (c) => (data += c));
      stream.on('end', () => {
        received.push({ from: String(session.envelope.mailFrom && session.envelope.mailFrom.address), to: session.envelope.rcptTo.map((r) => r.address), data });
        callback();
      });
    },
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const { port } = server.server.address() as AddressInfo;
  process.env.SMTP_URL = `smtp://127.0.0.1:${port}`;
  const { migrate } = await import('@/lib/migrate');
  await migrate();
});

afterAll(async () => {
  delete process.env.SMTP_URL;
  await new Promise<void>((r) => server.close(() => r()));
  const { getSequelize } = await import('@/lib/db');
  await getSequelize().close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('mail over SMTP', () => {
  it('delivers to the SMTP server and records the message as sent over SMTP', async () => {
    const { sendMail, linkMail, mailTransportKind, deliverOutbox } = await import('@/lib/mail');
    const { SentMail } = await import('@/models');
    expect(mailTransportKind()).toBe('smtp');
    const queued = await sendMail(linkMail('maker@example.org', 'Hello over SMTP', 'Intro line.', 'Open', 'http://127.0.0.1/x?token=abc', 'Bye.'));
    await deliverOutbox();
    const row = (await SentMail.findByPk(queued.id))!;
    expect(row.status).toBe('sent');
    expect(received).toHaveLength(1);
    expect(received[0].to).toEqual(['maker@example.org']);
    expect(received[0].data).toContain('Subject: Hello over SMTP');
    // The body is quoted-printable (RFC 2045), where '=' is written '=3D'.
    expect(received[0].data).toMatch(/http:\/\/127\.0\.0\.1\/x\?token=(3D)?abc/);
    expect(row.transport).toBe('smtp');
    expect(row.raw).toBeNull();
    // The record keeps no working link: the token is gone from both bodies, and nothing sealed is left.
    expect(row.text).not.toContain('token=abc');
    expect(row.text).toContain('token=[removed]');
    expect(row.html).not.toContain('abc');
    expect(row.sealed).toBeNull();
  });

  it('while the SMTP server refuses, the message waits with its error; when it is back, a retry delivers it', async () => {
    const { sendMail, linkMail, deliverOutbox } = await import('@/lib/mail');
    const { SentMail } = await import('@/models');
    const before = received.length;
    // A port nothing listens on: the connection is refused.
    const saved = process.env.SMTP_URL!;
    const down = new SMTPServer({ authOptional: true, disabledCommands: ['STARTTLS'] });
    await new Promise<void>((r) => down.listen(0, '127.0.0.1', () => r()));
    const deadPort = (down.server.address() as AddressInfo).port;
    await new Promise<void>((r) => down.close(() => r()));
    process.env.SMTP_URL = `smtp://127.0.0.1:${deadPort}`;
    const queued = await sendMail(linkMail('late@example.org', 'Sent by a retry', 'Intro.', 'Reset', 'http://127.0.0.1/reset?token=secret123', 'Bye.'));
    await deliverOutbox();
    let row = (await SentMail.findByPk(queued.id))!;
    expect(row.status).toBe('pending');
    expect(row.attempts).toBe(1);
    expect(row.lastError).toMatch(/ECONNREFUSED/);
    expect(row.nextAttemptAt!.getTime()).toBeGreaterThan(Date.now());
    // Even while it waits, the table holds no usable link: the body is sealed, the text redacted.
    expect(row.text).not.toContain('secret123');
    expect(row.sealed).not.toContain('secret123');
    // Not due yet: a pass now sends nothing.
    expect(await deliverOutbox()).toBe(0);
    // The server is back (same address as configured) and the retry time has come.
    process.env.SMTP_URL = saved;
    await SentMail.update({ transport: 'smtp' }, { where: { id: queued.id } });
    const sent = await deliverOutbox(new Date(row.nextAttemptAt!.getTime() + 1));
    expect(sent).toBe(1);
    row = (await SentMail.findByPk(queued.id))!;
    expect(row.status).toBe('sent');
    expect(row.attempts).toBe(2);
    expect(row.sealed).toBeNull();
    expect(received.length).toBe(before + 1);
    expect(received.at(-1)!.to).toEqual(['late@example.org']);
    // The delivered message carried the working link (quoted-printable may split it with '=\n').
    expect(received.at(-1)!.data.replace(/=\r?\n/g, '')).toMatch(/token=(3D)?secret123/);
  });

  it('gives up after the last attempt and says so on the row', async () => {
    const { sendMail, deliverOutbox, MAIL_MAX_ATTEMPTS } = await import('@/lib/mail');
    const { SentMail } = await import('@/models');
    const saved = process.env.SMTP_URL!;
    process.env.SMTP_URL = 'smtp://127.0.0.1:1';
    const queued = await sendMail({ to: 'never@example.org', subject: 'Never', text: 'x', html: '<p>x</p>' });
    let at = new Date();
    for (let i = 0; i < MAIL_MAX_ATTEMPTS; i++) {
      await deliverOutbox(at);
      at = new Date(at.getTime() + 3_600_000);
    }
    process.env.SMTP_URL = saved;
    const row = (await SentMail.findByPk(queued.id))!;
    expect(row.status).toBe('failed');
    expect(row.attempts).toBe(MAIL_MAX_ATTEMPTS);
    expect(row.lastError).toBeTruthy();
    expect(row.sealed).toBeNull();
  });

  it('without SMTP_URL keeps a complete RFC 5322 message in the outbox', async () => {
    const saved = process.env.SMTP_URL;
    delete process.env.SMTP_URL;
    const { sendMail, mailTransportKind, deliverOutbox } = await import('@/lib/mail');
    const { SentMail } = await import('@/models');
    expect(mailTransportKind()).toBe('fake');
    const before = received.length;
    const queued = await sendMail({ to: 'maker@example.org', subject: 'Kept locally', text: 'Plain text', html: '<p>Plain text</p>' });
    await deliverOutbox();
    process.env.SMTP_URL = saved;
    const row = (await SentMail.findByPk(queued.id))!;
    expect(row.transport).toBe('fake');
    expect(row.raw).toMatch(/^From: Hotlap <no-reply@hotlap\.local>/m);
    expect(row.raw).toMatch(/^Subject: Kept locally/m);
    expect(row.raw).toMatch(/Content-Type: multipart\/alternative/);
    expect(received).toHaveLength(before);
  });
});
