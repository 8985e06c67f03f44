/**
 * The two cheap reads every public request makes: whether a request can carry a session (the
 * cookie names next-auth uses, whole or split into chunks), and the standings change counter read
 * on its own SQLite connection — which must see a write committed by another connection (another
 * web server) on the very next read.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sqlite3 from 'sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hasSessionCookie } from '@/lib/auth/sessionCookie';

describe('hasSessionCookie', () => {
  it('knows the session cookie, its https name and its chunks, and nothing else', () => {
    expect(hasSessionCookie(['next-auth.session-token'])).toBe(true);
    expect(hasSessionCookie(['theme', '__Secure-next-auth.session-token'])).toBe(true);
    // next-auth splits a session larger than one cookie into NAME.0, NAME.1, …
    expect(hasSessionCookie(['next-auth.session-token.0', 'next-auth.session-token.1'])).toBe(true);
    expect(hasSessionCookie([])).toBe(false);
    expect(hasSessionCookie(['next-auth.csrf-token', 'next-auth.callback-url'])).toBe(false);
    expect(hasSessionCookie(['next-auth.session-tokens', 'x-next-auth.session-token'])).toBe(false);
  });
});

describe('readCounter on SQLite', () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-counter-'));
  const file = path.join(dir, 'counter.sqlite');
  const exec = (sql: string) =>
    new Promise<void>((ok, fail) => {
      const db = new sqlite3.Database(file);
      db.configure('busyTimeout', 5000);
      db.exec(sql, (e) => db.close(() => (e ? fail(e) : ok())));
    });

  beforeAll(async () => {
    process.env.DATABASE_URL = `sqlite:${file}`;
    await exec('PRAGMA journal_mode = WAL; CREATE TABLE standings_version (id INTEGER PRIMARY KEY, version INTEGER NOT NULL); INSERT INTO standings_version VALUES (1, 41);');
  });
  afterAll(async () => {
    (await import('@/lib/standings/version')).closeCounterReader();
    delete process.env.DATABASE_URL;
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('sees another connection’s committed write on the very next read', async () => {
    const { readCounter } = await import('@/lib/standings/version');
    expect(await readCounter()).toBe(41);
    await exec('UPDATE standings_version SET version = version + 1 WHERE id = 1');
    expect(await readCounter()).toBe(42);
    await exec('BEGIN IMMEDIATE; UPDATE standings_version SET version = 50 WHERE id = 1; COMMIT;');
    expect(await readCounter()).toBe(50);
    // Many readers at once on the one connection each get the row (no statement left half-read).
    expect(await Promise.all(Array.from({ length: 20 }, () => readCounter()))).toEqual(Array(20).fill(50));
  });

  it('is null when the row is missing', async () => {
    const { readCounter } = await import('@/lib/standings/version');
    await exec('DELETE FROM standings_version');
    expect(await readCounter()).toBeNull();
  });
});
