/**
 * Reading the standings change counter (`standings_version`, bumped by triggers on every write a
 * public page or answer shows) as cheaply as the database allows, because every public request
 * reads it once before it may reuse a kept answer.
 *
 * SQLite: one read-only connection of its own, kept open, outside Sequelize (no model layer, no
 * write queue, no per-query option parsing). Outside a transaction every statement sees the last
 * committed state of the file (WAL), so a write committed by any process — another web server on the
 * same database too — shows in the next read. Other databases go through Sequelize with the same
 * portable SQL; a port replaces `readCounter` with its own cheap read (a prepared statement on a pooled
 * client).
 */
import sqlite3 from 'sqlite3';
import { QueryTypes } from 'sequelize';
import { databaseUrl, getSequelize } from '@/lib/db';

export const VERSION_SQL = 'SELECT version FROM standings_version WHERE id = 1';

interface Reader {
  url: string;
  db: sqlite3.Database;
}
let reader: Reader | null = null;

function sqliteFile(url: string): string | null {
  if (!url.startsWith('sqlite:')) return null;
  const file = url.slice('sqlite:'.length);
  return file && file !== ':memory:' ? file : null;
}

function sqliteReader(url: string, file: string): sqlite3.Database {
  if (reader?.url === url) return reader.db;
  reader?.db.close();
  const db = new sqlite3.Database(file, sqlite3.OPEN_READONLY);
  db.configure('busyTimeout', 5000);
  reader = { url, db };
  return db;
}

/** The counter's value now (null when the row is missing). */
export async function readCounter(): Promise<number | null> {
  const url = databaseUrl();
  const file = sqliteFile(url);
  if (file) {
    const db = sqliteReader(url, file);
    const row = await new Promise<{ version: number } | undefined>((ok, fail) => db.get(VERSION_SQL, (e: Error | null, r: { version: number } | undefined) => (e ? fail(e) : ok(r))));
    return row ? Number(row.version) : null;
  }
  const [v] = await getSequelize().query<{ version: number }>(VERSION_SQL, { type: QueryTypes.SELECT });
  return v ? Number(v.version) : null;
}

/** Closes the counter's own connection (tests that replace the database file). */
export function closeCounterReader() {
  reader?.db.close();
  reader = null;
}
