/**
 * The one Sequelize connection of the process. SQLite file under data/ by default; DATABASE_URL
 * selects another database (e.g. `sqlite:/abs/path.sqlite`, or a postgres:// URL later).
 */
import path from 'node:path';
import fs from 'node:fs';
import { Sequelize, Transaction } from 'sequelize';
import sqlite3 from 'sqlite3';

/** Where the app keeps its files: the SQLite database and data/uploads. HOTLAP_DATA_DIR moves it. */
export function dataDir(): string {
  return process.env.HOTLAP_DATA_DIR || path.join(process.cwd(), 'data');
}

export function databaseUrl(): string {
  return process.env.DATABASE_URL || `sqlite:${path.join(dataDir(), 'hotlap.sqlite')}`;
}

function createSequelize(): Sequelize {
  const url = databaseUrl();
  if (!url.startsWith('sqlite:')) return new Sequelize(url, { logging: false });
  const storage = url.slice('sqlite:'.length) || ':memory:';
  if (storage !== ':memory:') fs.mkdirSync(path.dirname(path.resolve(/*turbopackIgnore: true*/ storage)), { recursive: true });
  return new Sequelize({
    dialect: 'sqlite',
    // Passing the driver explicitly keeps the dialect loading out of the bundler's way.
    dialectModule: sqlite3,
    storage,
    logging: false,
    // Several connections (one per transaction) share the file: retry on SQLITE_BUSY too.
    retry: { match: [/SQLITE_BUSY/], max: 5 },
    // A transaction takes the write lock when it begins. One that began by reading (DEFERRED)
    // gets SQLITE_BUSY at once, with no wait, when it writes after another connection committed
    // (WAL snapshot rule, sqlite.org "Write-Ahead Logging"); seen as a 500 under parallel tests.
    // BEGIN IMMEDIATE waits for the lock through busy_timeout instead.
    transactionType: Transaction.TYPES.IMMEDIATE,
    hooks: {
      afterConnect: async (connection: unknown) => {
        const db = connection as sqlite3.Database;
        const run = (sql: string) => new Promise<void>((ok, fail) => db.run(sql, (e) => (e ? fail(e) : ok())));
        // WAL lets readers proceed while one writer commits; busy_timeout waits instead of failing.
        await run('PRAGMA journal_mode = WAL');
        await run('PRAGMA busy_timeout = 5000');
        await run('PRAGMA foreign_keys = ON');
        await run('PRAGMA synchronous = NORMAL');
      },
    },
  });
}

const globalForDb = globalThis as unknown as { __hotlapSequelize?: Sequelize };

export function getSequelize(): Sequelize {
  if (!globalForDb.__hotlapSequelize) globalForDb.__hotlapSequelize = createSequelize();
  return globalForDb.__hotlapSequelize;
}
