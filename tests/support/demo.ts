import { DEMO_PASSWORD, DEMO_USERS } from '@/lib/seed';

export { DEMO_PASSWORD };
export const demoEmail = (key: string) => DEMO_USERS.find((u) => u.key === key)!.email;

/** The link (path + query) in a message text, e.g. "/verify?token=…". */
export function linkIn(text: string, pathPrefix: string): string {
  const m = text.match(new RegExp(`https?://[^\\s]+(${pathPrefix.replace('/', '\\/')}\\?token=[A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`No ${pathPrefix} link in:\n${text}`);
  return m[1];
}

/**
 * A new, confirmed entrant account of its own, signed in: for tests that must not share limits or
 * state (entry limits per entrant and class) with other test files on the same server.
 */
export async function freshEntrant(base: string, dbFile: string, name: string) {
  const { Client } = await import('./client');
  const { sql } = await import('./db');
  const email = `${name.toLowerCase().replace(/\W+/g, '.')}.${Date.now()}.${Math.floor(Math.random() * 1e6)}@example.org`;
  const password = 'fresh-entrant-password';
  const c = new Client(base);
  const res = await c.post('/api/account/signup', { name, email, password });
  if (res.status !== 202) throw new Error(`sign-up failed: ${res.status}`);
  await waitForAccount(dbFile, email);
  await sql(dbFile, "UPDATE users SET email_verified_at = '2026-11-01 00:00:00.000 +00:00' WHERE email = ?", [email]);
  const signin = await c.signIn(email, password);
  if (signin.status !== 200) throw new Error(`sign-in failed: ${signin.status}`);
  return Object.assign(c, { email });
}

/** Sign-up creates the account just after answering (same timing for taken and new addresses): wait for it. */
export async function waitForAccount(dbFile: string, email: string) {
  const { sql } = await import('./db');
  for (let i = 0; i < 100; i++) {
    if ((await sql(dbFile, 'SELECT id FROM users WHERE email = ?', [email])).length) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`No account for ${email} 10 s after signing up`);
}
