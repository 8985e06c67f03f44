/**
 * Attack: with TRUST_PROXY=1 the leftmost X-Forwarded-For entry was trusted, so a client could
 * prepend any address — escaping a lock, or rotating values so it never locks. The address is now
 * the N-th entry from the right (what the N trusted proxies appended).
 */
import { describe, it, expect, inject, afterEach } from 'vitest';
import { clientIp } from '@/lib/http';
import { SIGN_IN_LIMITS } from '@/lib/auth/limits';
import { freshAccount, randomIp } from './support';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const saved = process.env.TRUST_PROXY;
afterEach(() => {
  process.env.TRUST_PROXY = saved;
});

describe('client address behind proxies', () => {
  it('TRUST_PROXY=N takes the N-th address from the right; unset trusts nothing', () => {
    const h = new Headers({ 'x-forwarded-for': '6.6.6.6, 203.0.113.7, 10.0.0.2' });
    process.env.TRUST_PROXY = '1';
    expect(clientIp(h)).toBe('10.0.0.2');
    process.env.TRUST_PROXY = '2';
    expect(clientIp(h)).toBe('203.0.113.7');
    process.env.TRUST_PROXY = '4';
    expect(clientIp(h)).toBeNull();
    delete process.env.TRUST_PROXY;
    expect(clientIp(h)).toBeNull();
    process.env.TRUST_PROXY = '1';
    expect(clientIp({ 'x-forwarded-for': ['1.1.1.1', '2.2.2.2'] })).toBe('2.2.2.2');
  });

  it('attack: a locked address prepends a made-up X-Forwarded-For entry — still locked (server runs TRUST_PROXY=1)', { timeout: 90_000 }, async () => {
    const { email, password } = await freshAccount(base, dbFile, 'xff');
    const ip = randomIp();
    const post = async (xff: string, pw: string) => {
      const csrfRes = await fetch(`${base}/api/auth/csrf`, { headers: { 'x-forwarded-for': xff } });
      const { csrfToken } = await csrfRes.json();
      const cookie = csrfRes.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
      return fetch(`${base}/api/auth/callback/credentials`, {
        method: 'POST',
        headers: { 'x-forwarded-for': xff, cookie, 'content-type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams({ email, password: pw, csrfToken, json: 'true' }).toString(),
        redirect: 'manual',
      });
    };
    // Rotating made-up left entries: all land on the same (real, rightmost) address and lock it.
    const statuses = await Promise.all(Array.from({ length: SIGN_IN_LIMITS.pair.points }, (_, i) => post(`198.51.100.${i}, ${ip}`, 'wrong-wrong-wrong')));
    expect(statuses.map((r) => r.status).every((s) => s === 401)).toBe(true);
    expect((await post(`192.0.2.99, ${ip}`, password)).status).toBe(429);
  });
});
