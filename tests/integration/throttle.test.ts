import { describe, it, expect, inject } from 'vitest';
import { Client } from '../support/client';
import { demoEmail } from '../support/demo';
import { THROTTLE } from '@/lib/auth/throttle';

const base = inject('baseUrl');

describe('sign-in throttling', () => {
  it('answers a wrong password and an unknown e-mail alike', async () => {
    const a = await new Client(base).signIn(demoEmail('organizer'), 'wrong-password-1');
    const b = await new Client(base).signIn('no.such.person@example.org', 'wrong-password-1');
    expect(a.status).toBe(401);
    expect(b.status).toBe(401);
    expect(await a.json()).toEqual(await b.json());
  });

  it('slows repeated failures for one e-mail, then refuses with 429 and Retry-After', { timeout: 60_000 }, async () => {
    const email = `locked.out.${Date.now()}@example.org`;
    const c = new Client(base);
    for (let i = 0; i < THROTTLE.lockAfter; i++) expect((await c.signIn(email, 'wrong-password')).status).toBe(401);
    // A fresh client from another address is refused too: the lock is on the e-mail.
    const res = await new Client(base).signIn(email, 'wrong-password');
    expect(res.status).toBe(429);
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(60);
    const body = await res.json();
    expect(body.message).toMatch(/Too many failed sign-ins\. Wait 15 minutes/);
    expect(body.url).toContain('error=TooManyAttempts');
  });
});
