/**
 * Direct access to a test server's database, for arranging states a person cannot reach by hand
 * (e.g. an expired link). `db` is the SQLite file, or the postgres:// URL of the server's database
 * (tests/support/server.ts testDb). The same SQL runs on both: `?` placeholders (turned into $1, $2…
 * on PostgreSQL), and rows come back as SQLite gives them — JSON and dates as text (dates in the
 * 'YYYY-MM-DD HH:MM:SS.sss +00:00' form Sequelize writes to SQLite), booleans as 0/1, counts as numbers.
 */
import sqlite3 from 'sqlite3';
import pg from 'pg';

const TEXT = (v: string) => v;
const PG_AS_SQLITE: Record<number, (v: string) => unknown> = {
  16: (v) => (v === 't' ? 1 : 0), // bool
  20: Number, // int8 (COUNT(*), BIGINT)
  1700: Number, // numeric
  114: TEXT, // json
  3802: TEXT, // jsonb
  1184: (v) => sqliteDate(new Date(v.replace(' ', 'T').replace(/([+-]\d\d)$/, '$1:00'))), // timestamptz
};

function sqliteDate(d: Date): string {
  return `${d.toISOString().replace('T', ' ').replace('Z', '')} +00:00`;
}

/** `?` → `$n`, outside quoted strings and identifiers. */
export function numberedParams(query: string): string {
  let n = 0;
  let quote: string | null = null;
  let out = '';
  for (const ch of query) {
    if (quote) {
      if (ch === quote) quote = null;
    } else if (ch === "'" || ch === '"') quote = ch;
    else if (ch === '?') {
      out += `$${++n}`;
      continue;
    }
    out += ch;
  }
  return out;
}

async function pgSql<T>(url: string, query: string, params: unknown[]): Promise<T[]> {
  const client = new pg.Client({
    connectionString: url,
    types: { getTypeParser: ((oid: number, format?: string) => PG_AS_SQLITE[oid] ?? pg.types.getTypeParser(oid, format as 'text')) as typeof pg.types.getTypeParser },
  });
  await client.connect();
  try {
    const res = await client.query(numberedParams(query), params as unknown[]);
    return res.rows as T[];
  } finally {
    await client.end();
  }
}

export function sql<T = Record<string, unknown>>(db: string, query: string, params: unknown[] = []): Promise<T[]> {
  if (/^postgres(ql)?:\/\//.test(db)) return pgSql<T>(db, query, params);
  return new Promise((resolve, reject) => {
    const conn = new sqlite3.Database(db);
    conn.configure('busyTimeout', 5000);
    conn.all(query, params, (err, rows) => {
      conn.close();
      if (err) reject(err);
      else resolve(rows as T[]);
    });
  });
}

/** Several statements (no parameters) in one transaction, on either database: a write the triggers see as one. */
export async function sqlTransaction(db: string, statements: string[]): Promise<void> {
  if (/^postgres(ql)?:\/\//.test(db)) {
    const client = new pg.Client({ connectionString: db });
    await client.connect();
    try {
      await client.query(['BEGIN', ...statements, 'COMMIT'].join(';\n'));
    } finally {
      await client.end();
    }
    return;
  }
  await new Promise<void>((ok, fail) => {
    const conn = new sqlite3.Database(db);
    conn.configure('busyTimeout', 5000);
    conn.exec(['BEGIN IMMEDIATE', ...statements, 'COMMIT'].join(';\n'), (err) => conn.close(() => (err ? fail(err) : ok())));
  });
}
