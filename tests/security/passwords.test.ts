/**
 * Attacks on passwords: common and guessable ones accepted (`password12`, `aaaaaaaaaa`), and bcrypt
 * silently ignoring everything after byte 72.
 */
import bcrypt from 'bcryptjs';
import { describe, it, expect, inject } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { checkPassword, hashPassword } from '@/lib/auth/password';
import { PasswordSchema, SignUpSchema } from '@/lib/auth/schemas';
import { DEMO_PASSWORD } from '@/lib/seed';
import { freshAccount, randomIp, uniqueEmail } from './support';

const base = inject('baseUrl');
const dbFile = inject('dbFile');

describe('password rules', () => {
  it('attack: signing up with a common or guessable password — refused with a sentence saying why', async () => {
    for (const [password, why] of [
      ['password12', /commonly used password/],
      ['aaaaaaaaaa', /Repeated characters/],
      ['qwertyuiop12', /similar to a commonly used password/],
    ] as const) {
      const email = uniqueEmail('weak');
      const res = await new Client(base, randomIp()).post('/api/account/signup', { name: 'Weak Maker', email, password });
      expect(res.status, password).toBe(400);
      const body = await res.json();
      expect(body.fields.password, password).toMatch(why);
      expect(await sql(dbFile, 'SELECT id FROM users WHERE email = ?', [email])).toHaveLength(0);
    }
  });

  it('the same schema refuses a password made of the person’s own name, and passes the demo password', () => {
    const r = SignUpSchema.safeParse({ name: 'Marguerite Okonkwo', email: 'marguerite.okonkwo@example.org', password: 'MargueriteOkonkwo' });
    expect(r.success).toBe(false);
    expect(PasswordSchema.safeParse(DEMO_PASSWORD).success).toBe(true);
  });

  it('attack: two passwords equal in their first 72 bytes — bcrypt alone takes them for the same, ours does not', async () => {
    const prefix = 'x'.repeat(72);
    const a = `${prefix}-first-ending`;
    const b = `${prefix}-second-ending`;
    // The flaw this defends against (bcrypt reads 72 bytes; bcryptjs documents the same limit).
    expect(await bcrypt.compare(b, await bcrypt.hash(a, 4))).toBe(true);
    const stored = await hashPassword(a);
    expect(stored.startsWith('$hl1$')).toBe(true);
    expect((await checkPassword(a, stored)).ok).toBe(true);
    expect((await checkPassword(b, stored)).ok).toBe(false);
  });

  it('an old plain-bcrypt hash still signs in, and is replaced by the new format at that sign-in', async () => {
    const { email, password } = await freshAccount(base, dbFile, 'oldhash');
    await sql(dbFile, 'UPDATE users SET password_hash = ? WHERE email = ?', [await bcrypt.hash(password, 4), email]);
    const c = new Client(base, randomIp());
    expect((await c.signIn(email, password)).status).toBe(200);
    const row = (await sql<{ password_hash: string }>(dbFile, 'SELECT password_hash FROM users WHERE email = ?', [email]))[0];
    expect(row.password_hash.startsWith('$hl1$')).toBe(true);
    expect((await new Client(base, randomIp()).signIn(email, password)).status).toBe(200);
  });
});
