/**
 * Two writers on one SQLite file, as when a judge verifies an entry while an upload is saved. In
 * WAL mode a transaction that began by reading (BEGIN DEFERRED) cannot write once another
 * connection has committed since its read: SQLite answers SQLITE_BUSY at once, without calling the
 * busy handler (sqlite.org, "Write-Ahead Logging" §2.2 and "Isolation In SQLite"), so the request
 * failed with a 500 under load. Transactions take the write lock when they begin (IMMEDIATE), and
 * the other writer waits its turn through busy_timeout.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-dbconc-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'hotlap.sqlite')}`;
process.env.HOTLAP_DATA_DIR = dir;

type Db = typeof import('@/lib/db');
let db: Db;

beforeAll(async () => {
  db = await import('@/lib/db');
  await db.getSequelize().query('CREATE TABLE notes (id INTEGER PRIMARY KEY, body TEXT NOT NULL)');
});

afterAll(async () => {
  await db.getSequelize().close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const count = async (t?: import('sequelize').Transaction) => {
  const [rows] = await db.getSequelize().query('SELECT COUNT(*) AS n FROM notes', { transaction: t });
  return (rows as { n: number }[])[0].n;
};

describe('concurrent writers on the SQLite file', () => {
  it('a transaction that reads, then writes, survives another connection committing in between', async () => {
    const sequelize = db.getSequelize();
    const before = await count();
    const result = await sequelize.transaction(async (t) => {
      const seen = await count(t);
      // Another request writes while this transaction is between its read and its write.
      const other = sequelize.query("INSERT INTO notes (body) VALUES ('from another request')");
      await new Promise((r) => setTimeout(r, 100));
      await sequelize.query("INSERT INTO notes (body) VALUES ('from this transaction')", { transaction: t });
      return { seen, other };
    });
    await result.other;
    expect(result.seen).toBe(before);
    expect(await count()).toBe(before + 2);
  });
});
