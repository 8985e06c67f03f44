/**
 * Every connection the app's Sequelize instance makes runs with the settings lib/db.ts asks for:
 * read back through that instance, on the shared connection and inside transactions (the SQLite
 * dialect opens a separate connection for each transaction).
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes, type Sequelize } from 'sequelize';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-pragmas-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'pragmas.sqlite')}`;
let sequelize: Sequelize;

beforeAll(async () => {
  sequelize = (await import('@/lib/db')).getSequelize();
  await (await import('@/lib/migrate')).migrate();
});

afterAll(async () => {
  await sequelize.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

async function pragmas(transaction?: import('sequelize').Transaction) {
  const read = async (name: string) => {
    const rows = await sequelize.query<Record<string, unknown>>(`PRAGMA ${name}`, { transaction, type: QueryTypes.SELECT });
    return Object.values(rows[0])[0];
  };
  return {
    journal_mode: await read('journal_mode'),
    busy_timeout: await read('busy_timeout'),
    foreign_keys: await read('foreign_keys'),
    synchronous: await read('synchronous'),
  };
}

// sqlite.org "PRAGMA synchronous": NORMAL reads back as 1; the driver's own default busy timeout is 1000 ms.
const EXPECTED = { journal_mode: 'wal', busy_timeout: 5000, foreign_keys: 1, synchronous: 1 };

describe('database connection settings', () => {
  it('the shared connection runs with WAL, a 5 s busy timeout, foreign keys on and synchronous NORMAL', async () => {
    expect(await pragmas()).toEqual(EXPECTED);
  });

  it('a transaction’s own connection has the same settings from its first query on', async () => {
    const { CONNECTION_PRAGMAS } = await import('@/lib/db');
    expect(CONNECTION_PRAGMAS).toEqual(EXPECTED);
    const seen = await sequelize.transaction((t) => pragmas(t));
    expect(seen).toEqual(EXPECTED);
    // Two transactions at once: the second one's connection waits for the lock, with the settings too.
    const both = await Promise.all([sequelize.transaction((t) => pragmas(t)), sequelize.transaction((t) => pragmas(t))]);
    expect(both).toEqual([EXPECTED, EXPECTED]);
  });

  it('foreign keys are enforced: an entry for a season that does not exist is refused', async () => {
    await expect(
      sequelize.query(`INSERT INTO entries (season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, created_at, updated_at) VALUES (999, 999, 999, 999, 'pla', 0.4, 1000, 'draft', datetime(), datetime())`),
    ).rejects.toThrow(/FOREIGN KEY/);
    await expect(sequelize.transaction((transaction) => sequelize.query(`INSERT INTO inspections (entry_id, engine_version, status, created_at, updated_at) VALUES (999, 'x', 'queued', datetime(), datetime())`, { transaction }))).rejects.toThrow(/FOREIGN KEY/);
  });

  it('work scheduled from inside a writer (an afterCommit hook, say) queues behind the next writer once that writer is done', async () => {
    const { withWriteLock } = await import('@/lib/db');
    const order: string[] = [];
    let scheduled!: Promise<void>;
    await withWriteLock(async () => {
      scheduled = new Promise((r) => setTimeout(() => r(withWriteLock(async () => void order.push('scheduled'))), 20));
    });
    // Another writer takes the lock before the scheduled work runs, and holds it for a while.
    const other = withWriteLock(async () => {
      order.push('other starts');
      await new Promise((r) => setTimeout(r, 100));
      order.push('other ends');
    });
    await Promise.all([scheduled, other]);
    expect(order).toEqual(['other starts', 'other ends', 'scheduled']);
  });

  it('thirty writers at once all commit: none fails with SQLITE_BUSY', async () => {
    await sequelize.query('CREATE TABLE IF NOT EXISTS busy_probe (n INTEGER)');
    const results = await Promise.allSettled(
      Array.from({ length: 30 }, (_, i) =>
        sequelize.transaction(async (transaction) => {
          await sequelize.query('INSERT INTO busy_probe (n) VALUES (?)', { replacements: [i], transaction });
          await new Promise((r) => setTimeout(r, 5));
          await sequelize.query('UPDATE busy_probe SET n = n + 1 WHERE n = ?', { replacements: [i], transaction });
        }),
      ),
    );
    expect(results.filter((r) => r.status === 'rejected')).toEqual([]);
    const [rows] = await sequelize.query('SELECT COUNT(*) AS c FROM busy_probe');
    expect((rows as { c: number }[])[0].c).toBe(30);
  });
});
