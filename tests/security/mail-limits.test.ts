/**
 * Attack: asking for reset, sign-up and confirmation mails over and over (seen before: 8 requests,
 * 8 mails) — to flood someone's inbox or the mail server. Limited per e-mail and per address.
 */
import { describe, it, expect, inject } from 'vitest';
import { Client } from '../support/client';
import { MAIL_LIMITS } from '@/lib/auth/limits';
import { freshAccount, mailsTo, randomIp, waitForMails } from './support';

const base = inject('baseUrl');
const dbFile = inject('dbFile');

describe('mail-sending limits', () => {
  it('attack: eight reset requests for one address from eight addresses — only the first few send mail', async () => {
    const { email } = await freshAccount(base, dbFile, 'flood');
    // The sign-up counted one mail against this e-mail; its confirmation is written just after the
    // answer, so wait for it before counting (read too early, the count said 0 and the test flaked).
    const before = (await waitForMails(dbFile, email, 1)).length;
    const statuses: number[] = [];
    for (let i = 0; i < 8; i++) statuses.push((await new Client(base, randomIp()).post('/api/account/password-reset', { email })).status);
    expect(statuses.filter((s) => s === 202)).toHaveLength(MAIL_LIMITS.perEmail.points - before);
    expect(statuses.slice(-1)[0]).toBe(429);
    // Reset mails go out just after each answer: wait for them, then check no more came.
    await waitForMails(dbFile, email, MAIL_LIMITS.perEmail.points);
    await new Promise((r) => setTimeout(r, 500));
    expect((await mailsTo(dbFile, email)).length).toBe(MAIL_LIMITS.perEmail.points);
  });

  it('attack: one address asking for mails to many e-mails — refused past the per-address limit, with Retry-After', async () => {
    const ip = randomIp();
    let last: Response | null = null;
    for (let i = 0; i <= MAIL_LIMITS.perAddress.points; i++) {
      last = await new Client(base, ip).post('/api/account/verify/resend', { email: `spray.${i}.${Date.now()}@example.org` });
    }
    expect(last!.status).toBe(429);
    expect(Number(last!.headers.get('retry-after'))).toBeGreaterThan(0);
    expect((await last!.json()).error).toMatch(/Too many e-mails/);
  });
});
