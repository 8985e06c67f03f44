/** Helpers for the attack tests: fresh accounts of their own, raw sign-in posts, the outbox. */
import { Client } from '../support/client';
import { sql } from '../support/db';
import { waitForAccount } from '../support/demo';

let n = 0;
export const uniqueEmail = (tag: string) => `${tag}.${Date.now()}.${++n}.${Math.floor(Math.random() * 1e6)}@example.org`;
export const randomIp = () => `10.${50 + Math.floor(Math.random() * 200)}.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`;

export const STRONG_PASSWORD = 'tidal-gearbox-lantern-41';

/** A confirmed account of its own (so limits and sessions tested here touch nobody else). */
export async function freshAccount(base: string, dbFile: string, tag = 'sec') {
  const email = uniqueEmail(tag);
  const res = await new Client(base, randomIp()).post('/api/account/signup', { name: 'Test Maker', email, password: STRONG_PASSWORD });
  if (res.status !== 202) throw new Error(`sign-up failed: ${res.status} ${await res.text()}`);
  await waitForAccount(dbFile, email);
  await sql(dbFile, "UPDATE users SET email_verified_at = '2026-11-01 00:00:00.000 +00:00' WHERE email = ?", [email]);
  return { email, password: STRONG_PASSWORD };
}

/** Posts to next-auth's credentials callback as `body` (form string or JSON object), from `ip`. */
export async function rawSignIn(base: string, ip: string, body: (csrf: string) => string | Record<string, string>) {
  const c = new Client(base, ip);
  const { csrfToken } = (await (await c.get('/api/auth/csrf')).json()) as { csrfToken: string };
  const b = body(csrfToken);
  const res =
    typeof b === 'string'
      ? await c.request('/api/auth/callback/credentials', { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: b })
      : await c.request('/api/auth/callback/credentials', { method: 'POST', json: b });
  return Object.assign(res, { client: c });
}

export const formBody = (fields: [string, string][]) => new URLSearchParams(fields).toString();

export async function mailsTo(dbFile: string, to: string) {
  return sql<{ subject: string; text: string }>(dbFile, 'SELECT subject, text FROM sent_mails WHERE "to" = ? ORDER BY id', [to]);
}

/** Waits (polling, up to 10 s) until `count` mails to `to` exist: reset mails are sent just after the answer. */
export async function waitForMails(dbFile: string, to: string, count: number) {
  for (let i = 0; i < 100; i++) {
    const mails = await mailsTo(dbFile, to);
    if (mails.length >= count) return mails;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`Fewer than ${count} mails to ${to} after 10 s`);
}

/** The token of the newest reset link mailed to `to`, once it has arrived. */
export async function resetTokenFor(dbFile: string, to: string): Promise<string> {
  for (let i = 0; i < 100; i++) {
    const mail = (await mailsTo(dbFile, to)).filter((m) => m.subject === 'Choose a new Hotlap password').pop();
    const token = mail?.text.match(/token=([A-Za-z0-9_-]{43})/)?.[1];
    if (token) return token;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`No reset link mailed to ${to} after 10 s`);
}

export const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
};
