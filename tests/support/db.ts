/** Direct access to a test server's SQLite file, for arranging states a person cannot reach by hand (e.g. an expired link). */
import sqlite3 from 'sqlite3';

export function sql<T = Record<string, unknown>>(file: string, query: string, params: unknown[] = []): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file);
    db.configure('busyTimeout', 5000);
    db.all(query, params, (err, rows) => {
      db.close();
      if (err) reject(err);
      else resolve(rows as T[]);
    });
  });
}
