/**
 * Attack: tell whether an address has an account from how long sign-up or forgot-password takes
 * (seen before: 37 ms vs 558 ms, 143 ms vs 17 ms). Both branches now do the same expensive work (a
 * bcrypt hash, a mail). Measured as medians of interleaved requests in one run; the bound is a
 * generous ratio between the two branches, not an absolute time.
 */
import { describe, it, expect, inject } from 'vitest';
import { Client } from '../support/client';
import { freshAccount, randomIp, uniqueEmail, median, STRONG_PASSWORD } from './support';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const ROUNDS = 7;

async function timed(fn: () => Promise<Response>) {
  const t0 = performance.now();
  const res = await fn();
  await res.text();
  return { ms: performance.now() - t0, status: res.status };
}

async function compare(known: () => Promise<Response>, unknown: () => Promise<Response>) {
  const a: number[] = [];
  const b: number[] = [];
  for (let i = 0; i < ROUNDS; i++) {
    // Interleaved so that a slow spell of the machine hits both sides.
    const x = await timed(known);
    const y = await timed(unknown);
    expect(x.status).toBe(y.status);
    a.push(x.ms);
    b.push(y.ms);
  }
  const [ma, mb] = [median(a), median(b)];
  return { ma, mb, ratio: Math.max(ma, mb) / Math.min(ma, mb) };
}

describe('account enumeration by timing', () => {
  it('attack: sign-up takes as long for a taken address as for a new one', { timeout: 120_000 }, async () => {
    // Each address may be asked for a few mails an hour: spread the rounds over four taken ones.
    const taken = await Promise.all([0, 1, 2, 3].map(() => freshAccount(base, dbFile, 'taken')));
    let i = 0;
    const r = await compare(
      () => new Client(base, randomIp()).post('/api/account/signup', { name: 'Someone', email: taken[i++ % 4].email, password: STRONG_PASSWORD }),
      () => new Client(base, randomIp()).post('/api/account/signup', { name: 'Someone', email: uniqueEmail('new'), password: STRONG_PASSWORD }),
    );
    console.log(`sign-up median: taken ${r.ma.toFixed(1)} ms, new ${r.mb.toFixed(1)} ms, ratio ${r.ratio.toFixed(2)}`);
    expect(r.ratio).toBeLessThan(3);
  });

  it('attack: forgot-password takes as long for a known address as for an unknown one', { timeout: 120_000 }, async () => {
    const known = await Promise.all([0, 1, 2, 3].map(() => freshAccount(base, dbFile, 'forgot')));
    let i = 0;
    const r = await compare(
      () => new Client(base, randomIp()).post('/api/account/password-reset', { email: known[i++ % 4].email }),
      () => new Client(base, randomIp()).post('/api/account/password-reset', { email: uniqueEmail('nobody') }),
    );
    console.log(`forgot median: known ${r.ma.toFixed(1)} ms, unknown ${r.mb.toFixed(1)} ms, ratio ${r.ratio.toFixed(2)}`);
    expect(r.ratio).toBeLessThan(3);
  });
});
