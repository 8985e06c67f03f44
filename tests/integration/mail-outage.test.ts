/**
 * A mail server outage never changes an answer: a server of its own, configured with an SMTP server
 * that refuses connections, answers sign-up, submit and withdraw as usual; the mail waits in the
 * outbox with its error, and a restarted server delivers it once the SMTP server is back.
 */
import { describe, it, expect, inject, beforeAll, afterAll } from 'vitest';
import { type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import net from 'node:net';
import crypto from 'node:crypto';
import sharp from 'sharp';
import { gunzipSync, gzipSync } from 'node:zlib';
import { SMTPServer } from 'smtp-server';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { prepareDatabase, spawnApp, testDb, testEnv } from '../support/server';
import { FIXTURE_GCODE_DIR } from '../support/judging-fixtures';

// The shared test server is not used here, but the project's global setup provides it.
void inject('baseUrl');

const port = Number(process.env.HOTLAP_TEST_PORT || 3100) + 50;
const base = `http://127.0.0.1:${port}`;
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-outage-'));
const dbFile = testDb(testEnv(port, dataDir));
let smtpPort: number;
let env: Record<string, string>;
let child: ChildProcess | null = null;

async function freePort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()));
  const p = (s.address() as net.AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return p;
}

async function startApp() {
  child = await spawnApp(port, env, 'The outage test server');
}

async function stopApp() {
  if (!child) return;
  const c = child;
  child = null;
  await new Promise<void>((r) => {
    c.once('exit', () => r());
    c.kill('SIGTERM');
  });
}

type MailRow = { id: number; to: string; subject: string; status: string; attempts: number; last_error: string | null; text: string; sealed: string | null };
const mailsTo = (to: string) => sql<MailRow>(dbFile, 'SELECT * FROM sent_mails WHERE "to" = ? ORDER BY id', [to]);
const entryMailsTo = async (to: string) => (await mailsTo(to)).filter((m) => m.subject.startsWith('Entry '));

async function until<T>(what: string, fn: () => Promise<T | null | undefined | false>, tries = 240): Promise<T> {
  for (let i = 0; i < tries; i++) {
    const v = await fn();
    if (v) return v;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`timed out waiting for ${what}`);
}

beforeAll(async () => {
  smtpPort = await freePort(); // nothing listens there yet: connections are refused
  env = { ...testEnv(port, dataDir), SMTP_URL: `smtp://127.0.0.1:${smtpPort}`, MAIL_RETRY_BASE_MS: '2000', MAIL_POLL_MS: '300' };
  prepareDatabase(env);
  await startApp();
}, 180_000);

afterAll(async () => {
  await stopApp();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('with the SMTP server down', () => {
  let maker: Client & { email: string };
  let entryId: number;

  it('sign-up answers as usual; the confirmation waits in the outbox with the error and no usable link', async () => {
    const c = new Client(base);
    const email = `outage.${Date.now()}@example.org`;
    const res = await c.post('/api/account/signup', { name: 'Outage Maker', email, password: 'a-long-outage-password' });
    expect(res.status).toBe(202);
    const [row] = await until('a failed attempt', async () => {
      const rows = await mailsTo(email);
      return rows.length > 0 && rows[0].last_error ? rows : null;
    });
    expect(row.status).toBe('pending');
    expect(row.last_error).toMatch(/ECONNREFUSED/);
    expect(row.text).toContain('token=[removed]');
    expect(row.text).not.toMatch(/token=[A-Za-z0-9_-]{16,}/);
  });

  it('submit and withdraw answer 200 and their mails wait too', async () => {
    maker = await freshEntrant(base, dbFile, 'Outage Entrant');
    const m = await maker.post('/api/entrant/machines', { name: 'Outage Rig', motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4, hotend: 'Test hotend', isModified: false });
    expect(m.status).toBe(201);
    const [season] = await sql<{ id: number }>(dbFile, "SELECT id FROM seasons WHERE slug = 'frostbite-sprint'");
    const [cls] = await sql<{ id: number }>(dbFile, "SELECT id FROM classes WHERE season_id = ? AND slug = 'open-04'", [season.id]);
    const gcode = gzipSync(Buffer.concat([gunzipSync(fs.readFileSync(path.join(FIXTURE_GCODE_DIR, 'prusa-beacon-020.gcode.gz'))), Buffer.from(`\n; outage ${crypto.randomUUID()}\n`)]));
    const photo = await sharp({ create: { width: 300, height: 200, channels: 3, background: '#444' } }).jpeg().toBuffer();
    const f = new FormData();
    const fields = { seasonId: String(season.id), classId: String(cls.id), machineId: String((await m.json()).id), materialFamily: 'pla', materialName: '', nozzleMm: '0.4', claimedTime: '0:25:10.0', evidenceUrl: 'https://video.example.org/outage', notes: '' };
    for (const [k, v] of Object.entries(fields)) f.append(k, v);
    f.append('gcode', new Blob([new Uint8Array(gcode)]), 'beacon.gcode.gz');
    f.append('photos', new Blob([new Uint8Array(photo)]), 'a.jpg');
    f.append('photos', new Blob([new Uint8Array(photo)]), 'b.jpg');
    const created = await maker.request('/api/entries', { method: 'POST', body: f });
    expect(created.status, await created.clone().text()).toBe(201);
    entryId = (await created.json()).id;
    await until('the inspection', async () => {
      const body = await (await maker.get(`/api/entries/${entryId}/inspection`)).json();
      return body.inspection?.status === 'done' && body.blockers.length === 0;
    }, 480);
    const sub = await maker.post(`/api/entries/${entryId}/submit`, {});
    expect(sub.status, await sub.clone().text()).toBe(200);
    const wd = await maker.post(`/api/entries/${entryId}/withdraw`, {});
    expect(wd.status, await wd.clone().text()).toBe(200);
    const rows = await until('two failed attempts', async () => {
      const r = await entryMailsTo(maker.email);
      return r.length === 2 && r.every((x) => x.last_error) ? r : null;
    });
    expect(rows.map((r) => r.subject)).toEqual([expect.stringMatching(/^Entry received/), expect.stringMatching(/^Entry withdrawn/)]);
    expect(rows.every((r) => r.status === 'pending' && /ECONNREFUSED/.test(r.last_error ?? ''))).toBe(true);
    expect((await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [entryId]))[0].state).toBe('withdrawn');
  }, 180_000);

  it('the admin outbox shows no message bodies in SMTP mode, only who, what and the delivery state', async () => {
    const admin = new Client(base);
    expect((await admin.signIn(demoEmail('admin'), DEMO_PASSWORD)).status).toBe(200);
    const body = await (await admin.get(`/api/admin/outbox?to=${encodeURIComponent(maker.email)}`)).json();
    expect(body.bodiesShown).toBe(false);
    // The sign-up confirmation and the two entry mails.
    expect(body.messages.length).toBe(3);
    for (const m of body.messages) {
      expect(m.text).toBeNull();
      expect(m.html).toBeNull();
      expect(m.status).toBe('pending');
    }
    const page = await (await admin.get('/admin/outbox')).text();
    expect(page).not.toContain('data-testid="mail-text"');
  });

  it('after a restart with the SMTP server back, the waiting mail is delivered', async () => {
    await stopApp();
    const received: { to: string[]; data: string }[] = [];
    const smtp = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS'],
      onData(stream, session, cb) {
        let data = '';
        stream.on('data', (d) => (data += d));
        stream.on('end', () => {
          received.push({ to: session.envelope.rcptTo.map((r) => r.address), data });
          cb();
        });
      },
    });
    await new Promise<void>((r) => smtp.listen(smtpPort, '127.0.0.1', () => r()));
    try {
      await startApp();
      await until('delivery of every waiting mail', async () => {
        const left = await sql<{ n: number }>(dbFile, "SELECT COUNT(*) AS n FROM sent_mails WHERE status <> 'sent'");
        return left[0].n === 0;
      });
      // The entry mails (their subjects are MIME-encoded: they contain a middle dot) and the confirmation.
      const mine = received.filter((m) => m.to.includes(maker.email) && !/Subject: Confirm/.test(m.data));
      expect(mine).toHaveLength(2);
      const rows2 = await entryMailsTo(maker.email);
      expect(rows2.map((r) => r.status)).toEqual(['sent', 'sent']);
      // The confirmation link went out working, while the stored copy never held it.
      const confirm = received.find((m) => /Subject: Confirm your e-mail/.test(m.data))!;
      expect(confirm.data.replace(/=\r?\n/g, '')).toMatch(/verify\?token=(3D)?[A-Za-z0-9_-]{16,}/);
      const rows = await sql<{ sealed: string | null }>(dbFile, 'SELECT sealed FROM sent_mails');
      expect(rows.every((r) => r.sealed === null)).toBe(true);
    } finally {
      await stopApp();
      await new Promise<void>((r) => smtp.close(() => r()));
    }
  }, 180_000);
});
