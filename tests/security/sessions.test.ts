/**
 * Attack: a session cookie taken before a password reset, before sign-out, or before an admin
 * changed the account's roles keeps working for its 30 days. Sessions now carry a version and an
 * id checked on every request.
 */
import { describe, it, expect, inject } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail } from '../support/demo';
import { freshAccount, randomIp, resetTokenFor } from './support';

const base = inject('baseUrl');
const dbFile = inject('dbFile');

async function signedIn(email: string, password: string) {
  const c = new Client(base, randomIp());
  expect((await c.signIn(email, password)).status).toBe(200);
  return c;
}

/** A second client holding a copy of `c`'s cookies, as a thief would. */
function copyOf(c: Client) {
  const thief = new Client(base, randomIp());
  (thief as unknown as { cookies: Map<string, string> }).cookies = new Map((c as unknown as { cookies: Map<string, string> }).cookies);
  return thief;
}

describe('ending sessions', () => {
  it('attack: a cookie copied before a password reset stops working after it', async () => {
    const { email, password } = await freshAccount(base, dbFile, 'reset');
    const victim = await signedIn(email, password);
    const thief = copyOf(victim);
    expect((await thief.get('/api/me')).status).toBe(200);
    await new Client(base, randomIp()).post('/api/account/password-reset', { email });
    const token = await resetTokenFor(dbFile, email);
    expect((await new Client(base).post('/api/account/password-reset/confirm', { token, password: 'quartz-harbour-pivot-58' })).status).toBe(200);
    expect((await thief.get('/api/me')).status).toBe(401);
    expect((await victim.get('/api/me')).status).toBe(401);
  });

  it('attack: a cookie copied before sign-out stops working after it; other devices stay signed in', async () => {
    const { email, password } = await freshAccount(base, dbFile, 'signout');
    const laptop = await signedIn(email, password);
    const phone = await signedIn(email, password);
    const thief = copyOf(laptop);
    const { csrfToken } = await (await laptop.get('/api/auth/csrf')).json();
    const out = await laptop.request('/api/auth/signout', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ csrfToken, json: 'true' }).toString(),
    });
    expect(out.status).toBe(200);
    expect((await thief.get('/api/me')).status).toBe(401);
    expect((await phone.get('/api/me')).status).toBe(200);
  });

  it('"sign out everywhere" ends every session of the account', async () => {
    const { email, password } = await freshAccount(base, dbFile, 'everywhere');
    const a = await signedIn(email, password);
    const b = await signedIn(email, password);
    const res = await a.request('/api/account/sessions', { method: 'DELETE' });
    expect(res.status).toBe(200);
    expect((await res.json()).message).toMatch(/signed out on every device/);
    expect((await a.get('/api/me')).status).toBe(401);
    expect((await b.get('/api/me')).status).toBe(401);
    // Signing in again works.
    expect((await (await signedIn(email, password)).get('/api/me')).status).toBe(200);
  });

  it("an admin's role change ends the account's earlier sessions", async () => {
    const { email, password } = await freshAccount(base, dbFile, 'roles');
    const user = await signedIn(email, password);
    const id = (await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [email]))[0].id;
    const admin = await signedIn(demoEmail('admin'), DEMO_PASSWORD);
    expect((await admin.put(`/api/admin/users/${id}/roles`, { roles: ['entrant', 'judge'] })).status).toBe(200);
    expect((await user.get('/api/me')).status).toBe(401);
    const again = await signedIn(email, password);
    expect((await again.get('/api/judging/queue')).status).toBe(200);
  });
});
