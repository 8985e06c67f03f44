/**
 * Modules that must never reach a browser bundle carry `import 'server-only'`: Next.js resolves it
 * to an empty module under the react-server condition (pages, route handlers) and to a module that
 * throws anywhere else, so a client component importing them fails the build. Scripts and tests run
 * outside that condition, which is why only modules they never load carry it (lib/db.ts, the auth
 * options and the mail outbox are loaded by scripts/seed.ts and unit tests, and cannot).
 */
import { describe, expect, it } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';

export const SERVER_ONLY = ['lib/accounts.ts', 'lib/admin.ts', 'lib/auth/tokens.ts', 'lib/storage/access.ts', 'lib/queries.ts'];

describe('server-only modules', () => {
  it.each(SERVER_ONLY)('%s imports server-only', (file) => {
    const text = fs.readFileSync(path.join(process.cwd(), file), 'utf8');
    expect(text).toMatch(/^import 'server-only';$/m);
  });
  it('outside the react-server condition the guard throws (so a browser bundle would fail)', async () => {
    await expect(import('@/lib/admin')).rejects.toThrow(/Client Component|server/i);
  });
});
