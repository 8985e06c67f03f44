import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, linkIn, freshEntrant } from '../support/demo';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const admin = new Client(base);

/** The newest mail to `to` (with that subject, when given; reset mails go out just after the answer, so it waits up to 10 s). */
async function latestMail(to: string, subject?: string) {
  for (let i = 0; ; i++) {
    const res = await admin.get(`/api/admin/outbox?to=${encodeURIComponent(to)}`);
    expect(res.status).toBe(200);
    const { messages } = (await res.json()) as { messages: { subject: string; text: string }[] };
    const mail = subject ? messages.find((m) => m.subject === subject) : messages[0];
    if (mail) return mail;
    if (i >= 100) throw new Error(`No mail${subject ? ` "${subject}"` : ''} to ${to} after 10 s`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

const tokenOf = (link: string) => new URL(link, base).searchParams.get('token')!;

beforeAll(async () => {
  const res = await admin.signIn(demoEmail('admin'), DEMO_PASSWORD);
  expect(res.status).toBe(200);
});

describe('sign-up, confirmation and sign-in', () => {
  const email = `new.maker.${Date.now()}@example.org`;
  const password = 'a-long-enough-password';

  it('refuses bad input field by field and saves nothing', async () => {
    const c = new Client(base);
    const res = await c.post('/api/account/signup', { name: 'X', email: 'not-an-address', password: 'short' });
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.fields.email).toMatch(/e-mail address like/);
    expect(body.fields.password).toMatch(/at least 10 characters/);
    expect(body.fields.name).toMatch(/at least 2/);
    const rows = await sql(dbFile, 'SELECT id FROM users WHERE email = ?', ['not-an-address']);
    expect(rows).toHaveLength(0);
  });

  it('refuses a body that is not JSON with a 400, not a crash', async () => {
    const c = new Client(base);
    const res = await c.request('/api/account/signup', { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{oops' });
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/not valid JSON/);
  });

  it('signs up, mails a confirmation link, and sign-in waits for it', async () => {
    const c = new Client(base);
    const res = await c.post('/api/account/signup', { name: 'New Maker', email, password });
    expect(res.status).toBe(202);
    const mail = await latestMail(email);
    expect(mail.subject).toBe('Confirm your e-mail for Hotlap');
    // Before confirming, the right password meets a specific message.
    const early = await c.signIn(email, password);
    expect(early.status).toBe(401);
    expect((await early.json()).url).toContain('error=EmailNotVerified');

    const token = tokenOf(linkIn(mail.text, '/verify'));
    const ok = await c.post('/api/account/verify', { token });
    expect(ok.status).toBe(200);
    const again = await c.post('/api/account/verify', { token });
    expect(again.status).toBe(410);
    expect((await again.json()).error).toMatch(/already been used/);

    const signin = await c.signIn(email, password);
    expect(signin.status).toBe(200);
    expect(c.hasSession()).toBe(true);
    const me = await c.get('/api/me');
    expect(me.status).toBe(200);
    expect((await me.json()).roles).toEqual(['entrant']);
  });

  it('a duplicate sign-up answers like any other, creates nothing and tells the owner by mail', async () => {
    const c = new Client(base);
    const before = await sql<{ n: number }>(dbFile, 'SELECT COUNT(*) AS n FROM users');
    const res = await c.post('/api/account/signup', { name: 'Someone Else', email: email.toUpperCase(), password: 'another-long-password' });
    expect(res.status).toBe(202);
    // The reminder goes out just after the answer; once it is there, the work is done.
    expect((await latestMail(email, 'You already have a Hotlap account')).subject).toBe('You already have a Hotlap account');
    const after = await sql<{ n: number }>(dbFile, 'SELECT COUNT(*) AS n FROM users');
    expect(after[0].n).toBe(before[0].n);
    // The original password still works: nothing was overwritten.
    expect((await new Client(base).signIn(email, password)).status).toBe(200);
  });

  it('refuses a malformed or unknown confirmation token with a sentence', async () => {
    const c = new Client(base);
    const bad = await c.post('/api/account/verify', { token: 'abc' });
    expect(bad.status).toBe(400);
    expect((await bad.json()).fields.token).toMatch(/not valid/);
    const unknown = await c.post('/api/account/verify', { token: 'A'.repeat(43) });
    expect(unknown.status).toBe(400);
    expect((await unknown.json()).error).toMatch(/not valid/);
  });

  it('refuses an expired confirmation link and changes nothing', async () => {
    const c = new Client(base);
    const e2 = `late.maker.${Date.now()}@example.org`;
    await c.post('/api/account/signup', { name: 'Late Maker', email: e2, password });
    const token = tokenOf(linkIn((await latestMail(e2, 'Confirm your e-mail for Hotlap')).text, '/verify'));
    await sql(dbFile, "UPDATE auth_tokens SET expires_at = '2000-01-01 00:00:00.000 +00:00' WHERE user_id = (SELECT id FROM users WHERE email = ?)", [e2]);
    const res = await c.post('/api/account/verify', { token });
    expect(res.status).toBe(410);
    expect((await res.json()).error).toMatch(/expired/);
    const rows = await sql<{ v: string | null }>(dbFile, 'SELECT email_verified_at AS v FROM users WHERE email = ?', [e2]);
    expect(rows[0].v).toBeNull();
  });
});

describe('password reset', () => {
  it('answers the same for known and unknown addresses', async () => {
    const c = new Client(base);
    const known = await c.post('/api/account/password-reset', { email: demoEmail('pim') });
    const unknown = await c.post('/api/account/password-reset', { email: 'nobody.here@example.org' });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(await known.json()).toEqual(await unknown.json());
  });

  it('resets through the mailed link once; the old password stops working', async () => {
    const c = new Client(base);
    // An account of its own: other files sign in as the demo users on the same server.
    const { email } = await freshEntrant(base, dbFile, 'Reset Maker');
    await c.post('/api/account/password-reset', { email });
    const mail = await latestMail(email, 'Choose a new Hotlap password');
    expect(mail.subject).toBe('Choose a new Hotlap password');
    const token = tokenOf(linkIn(mail.text, '/reset'));
    const short = await c.post('/api/account/password-reset/confirm', { token, password: 'short' });
    expect(short.status).toBe(400);
    expect((await short.json()).fields.password).toMatch(/at least 10/);
    const ok = await c.post('/api/account/password-reset/confirm', { token, password: 'brand-new-password-1' });
    expect(ok.status).toBe(200);
    const reused = await c.post('/api/account/password-reset/confirm', { token, password: 'brand-new-password-2' });
    expect(reused.status).toBe(410);
    expect((await reused.json()).error).toMatch(/already been used/);
    expect((await new Client(base).signIn(email, 'fresh-entrant-password')).status).toBe(401);
    expect((await new Client(base).signIn(email, 'brand-new-password-1')).status).toBe(200);
  });
});
