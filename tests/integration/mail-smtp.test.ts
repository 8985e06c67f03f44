/**
 * The real SMTP path: with SMTP_URL set, lib/mail hands the message to an SMTP server (here a
 * local smtp-server instance on 127.0.0.1, the SMTP library from the nodemailer project) and
 * records it in sent_mails as sent over SMTP.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-smtp-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'mail.sqlite')}`;

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
    const { sendMail, linkMail, mailTransportKind } = await import('@/lib/mail');
    expect(mailTransportKind()).toBe('smtp');
    const row = await sendMail(linkMail('maker@example.org', 'Hello over SMTP', 'Intro line.', 'Open', 'http://127.0.0.1/x?token=abc', 'Bye.'));
    expect(received).toHaveLength(1);
    expect(received[0].to).toEqual(['maker@example.org']);
    expect(received[0].data).toContain('Subject: Hello over SMTP');
    // The body is quoted-printable (RFC 2045), where '=' is written '=3D'.
    expect(received[0].data).toMatch(/http:\/\/127\.0\.0\.1\/x\?token=(3D)?abc/);
    expect(row.transport).toBe('smtp');
    expect(row.raw).toBeNull();
  });

  it('without SMTP_URL keeps a complete RFC 5322 message in the outbox', async () => {
    const saved = process.env.SMTP_URL;
    delete process.env.SMTP_URL;
    const { sendMail, mailTransportKind } = await import('@/lib/mail');
    expect(mailTransportKind()).toBe('fake');
    const row = await sendMail({ to: 'maker@example.org', subject: 'Kept locally', text: 'Plain text', html: '<p>Plain text</p>' });
    process.env.SMTP_URL = saved;
    expect(row.transport).toBe('fake');
    expect(row.raw).toMatch(/^From: Hotlap <no-reply@hotlap\.local>/m);
    expect(row.raw).toMatch(/^Subject: Kept locally/m);
    expect(row.raw).toMatch(/Content-Type: multipart\/alternative/);
    expect(received).toHaveLength(1);
  });
});
