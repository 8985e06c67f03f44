/**
 * lib/dbDialect.ts on SQLite, without a server: the triggers it creates are the ones SQLite stores
 * (read back from sqlite_master) and they fire; raw-row values parse the same from either database.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes, type Sequelize } from 'sequelize';
import { parseDateColumn, parseJsonColumn, utcDaySql } from '@/lib/dbDialect';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-dialect-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'dialect.sqlite')}`;
let sequelize: Sequelize;

beforeAll(async () => {
  sequelize = (await import('@/lib/db')).getSequelize();
});

afterAll(async () => {
  await sequelize.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('dialect helpers on SQLite', () => {
  it('createTrigger makes a SQLite trigger with its WHEN clause that fires only when the condition holds; dropTrigger removes it', async () => {
    const { createTrigger, dropTrigger, listTriggers } = await import('@/lib/dbDialect');
    const qi = sequelize.getQueryInterface();
    await sequelize.query('CREATE TABLE t (id INTEGER PRIMARY KEY, state TEXT)');
    await sequelize.query('CREATE TABLE counter (n INTEGER)');
    await sequelize.query('INSERT INTO counter (n) VALUES (0)');
    await createTrigger(qi, 'bump_t', 'AFTER INSERT ON t', 'UPDATE counter SET n = n + 1', "NEW.state = 'verified'");
    const [{ sql }] = await sequelize.query<{ sql: string }>("SELECT sql FROM sqlite_master WHERE name = 'bump_t'", { type: QueryTypes.SELECT });
    expect(sql).toBe("CREATE TRIGGER bump_t AFTER INSERT ON t WHEN NEW.state = 'verified' BEGIN UPDATE counter SET n = n + 1; END");
    await sequelize.query("INSERT INTO t (state) VALUES ('draft'), ('verified')");
    expect((await sequelize.query<{ n: number }>('SELECT n FROM counter', { type: QueryTypes.SELECT }))[0].n).toBe(1);
    expect(await listTriggers(sequelize)).toContain('bump_t');
    await dropTrigger(qi, 'bump_t', 'AFTER INSERT ON t');
    expect(await listTriggers(sequelize)).not.toContain('bump_t');
  });

  it('reads dates as SQLite stores them (Sequelize text, CURRENT_TIMESTAMP) and as PostgreSQL returns them', () => {
    const iso = '2026-12-03T18:00:00.250Z';
    expect(parseDateColumn('2026-12-03 18:00:00.250 +00:00')!.toISOString()).toBe(iso);
    expect(parseDateColumn('2026-12-03 20:00:00.250 +02:00')!.toISOString()).toBe(iso);
    // CURRENT_TIMESTAMP is UTC without a zone (sqlite.org "Date And Time Functions").
    expect(parseDateColumn('2026-12-03 18:00:00')!.toISOString()).toBe('2026-12-03T18:00:00.000Z');
    expect(parseDateColumn(new Date(iso))!.toISOString()).toBe(iso);
    expect(parseDateColumn(null)).toBeNull();
  });

  it('reads JSON columns as text (SQLite) or parsed (PostgreSQL jsonb)', () => {
    expect(parseJsonColumn('["a",1]')).toEqual(['a', 1]);
    expect(parseJsonColumn({ a: 1 })).toEqual({ a: 1 });
    expect(parseJsonColumn(null)).toBeNull();
  });

  it('the UTC day of a date column, in SQL that runs here', async () => {
    const [{ d }] = await sequelize.query<{ d: string }>(`SELECT ${utcDaySql(sequelize, "'2026-12-03 23:30:00.000 +00:00'")} AS d`, { type: QueryTypes.SELECT });
    expect(d).toBe('2026-12-03');
    expect(utcDaySql({ getDialect: () => 'postgres' } as never, 'x')).toBe("to_char(x AT TIME ZONE 'UTC', 'YYYY-MM-DD')");
  });
});
