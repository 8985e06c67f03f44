/**
 * Attacks on sign-in throttling: a JSON body, a repeated e-mail field, many guesses at once, and a
 * stranger locking a known person out. The counters live in the database (rate_limits).
 */
import { describe, it, expect, inject } from 'vitest';
import { sql } from '../support/db';
import { freshAccount, rawSignIn, formBody, randomIp, resetTokenFor } from './support';
import { SIGN_IN_LIMITS, slowDownMs } from '@/lib/auth/limits';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const WRONG = 'not-the-password-at-all';

/** Sends `count` wrong passwords for `email` from `ip` at once; returns the statuses. */
async function wrongGuesses(email: string, ip: string, count: number) {
  const all = await Promise.all(
    Array.from({ length: count }, () => rawSignIn(base, ip, (csrf) => formBody([['email', email], ['password', WRONG], ['csrfToken', csrf], ['json', 'true']]))),
  );
  return all.map((r) => r.status);
}

const pairPoints = async (email: string, ip: string) =>
  (await sql<{ points: number }>(dbFile, 'SELECT points FROM rate_limits WHERE rl_key = ?', [`signin_pair:${email}|${ip}`]))[0]?.points ?? 0;

describe('sign-in throttling', () => {
  it('attack: thirty wrong passwords sent in parallel — all thirty are counted, and the last ones are refused', { timeout: 90_000 }, async () => {
    const { email } = await freshAccount(base, dbFile, 'parallel');
    const ip = randomIp();
    const statuses = await wrongGuesses(email, ip, 30);
    expect(await pairPoints(email, ip)).toBe(30);
    // The limit is reached inside the burst: the attempts past it are refused, not checked.
    expect(statuses.filter((s) => s === 429).length).toBe(30 - (SIGN_IN_LIMITS.pair.points));
    expect(statuses.filter((s) => s === 401).length).toBe(SIGN_IN_LIMITS.pair.points);
  });

  it('attack: a locked account signs in with a JSON body instead of a form — refused with 429 too', { timeout: 90_000 }, async () => {
    const { email, password } = await freshAccount(base, dbFile, 'jsonbody');
    const ip = randomIp();
    await wrongGuesses(email, ip, SIGN_IN_LIMITS.pair.points);
    const res = await rawSignIn(base, ip, (csrf) => ({ email, password, csrfToken: csrf, json: 'true' }));
    expect(res.status).toBe(429);
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(60);
    const body = await res.json();
    expect(body.message).toMatch(/Too many failed sign-ins\. Wait \d+ minutes/);
    expect(res.client.hasSession()).toBe(false);
    // And the lock was not cleared by trying.
    expect(await pairPoints(email, ip)).toBeGreaterThan(SIGN_IN_LIMITS.pair.points);
  });

  it('attack: email=decoy&email=victim — the counted e-mail is the one whose password is checked', { timeout: 90_000 }, async () => {
    const victim = await freshAccount(base, dbFile, 'victim');
    const ip = randomIp();
    await wrongGuesses(victim.email, ip, SIGN_IN_LIMITS.pair.points);
    const res = await rawSignIn(base, ip, (csrf) =>
      formBody([['email', 'decoy@example.org'], ['email', victim.email], ['password', victim.password], ['csrfToken', csrf], ['json', 'true']]),
    );
    expect(res.status).toBe(429);
    expect(res.client.hasSession()).toBe(false);
    // The decoy was not the one counted.
    expect(await pairPoints('decoy@example.org', ip)).toBe(0);
  });

  it('attack: a stranger hammers a known name to keep its owner out — the owner still signs in from a known address, and after a reset', { timeout: 120_000 }, async () => {
    const { email, password } = await freshAccount(base, dbFile, 'owner');
    const home = randomIp();
    // The owner signed in from home before.
    expect((await rawSignIn(base, home, (csrf) => formBody([['email', email], ['password', password], ['csrfToken', csrf], ['json', 'true']]))).status).toBe(200);
    // Strangers from many addresses run the account's own limit past its end.
    const total = SIGN_IN_LIMITS.account.points + 2;
    for (let sent = 0; sent < total; sent += 8) await wrongGuesses(email, randomIp(), Math.min(8, total - sent));
    const stranger = await rawSignIn(base, randomIp(), (csrf) => formBody([['email', email], ['password', password], ['csrfToken', csrf], ['json', 'true']]));
    expect(stranger.status).toBe(429);
    // From home the owner is not refused.
    const owner = await rawSignIn(base, home, (csrf) => formBody([['email', email], ['password', password], ['csrfToken', csrf], ['json', 'true']]));
    expect(owner.status).toBe(200);
    expect(owner.client.hasSession()).toBe(true);
    // From a new address, the e-mailed reset link clears the account's limit.
    const cafe = randomIp();
    const { Client } = await import('../support/client');
    await new Client(base, cafe).post('/api/account/password-reset', { email });
    const token = await resetTokenFor(dbFile, email);
    const newPassword = 'copper-meadow-sprocket-77';
    expect((await new Client(base, cafe).post('/api/account/password-reset/confirm', { token, password: newPassword })).status).toBe(200);
    const after = await rawSignIn(base, cafe, (csrf) => formBody([['email', email], ['password', newPassword], ['csrfToken', csrf], ['json', 'true']]));
    expect(after.status).toBe(200);
  });

  it('slows down before refusing: no wait for the first failures, then one second more each, at most five', () => {
    const free = SIGN_IN_LIMITS.freePairFailures;
    expect([0, 1, 2, 3, 4, 5, 9, 20].map((f) => slowDownMs(f, free))).toEqual([0, 0, 0, 0, 1000, 2000, 5000, 5000]);
    // The refusal comes only after the slow-down has had its turns.
    expect(SIGN_IN_LIMITS.pair.points).toBeGreaterThan(free + 1);
  });

  it('answers a wrong password and an unknown e-mail alike', async () => {
    const { email } = await freshAccount(base, dbFile, 'alike');
    const a = await rawSignIn(base, randomIp(), (csrf) => formBody([['email', email], ['password', WRONG], ['csrfToken', csrf], ['json', 'true']]));
    const b = await rawSignIn(base, randomIp(), (csrf) => formBody([['email', 'no.such.person@example.org'], ['password', WRONG], ['csrfToken', csrf], ['json', 'true']]));
    expect(a.status).toBe(401);
    expect(b.status).toBe(401);
    expect(await a.json()).toEqual(await b.json());
  });
});
