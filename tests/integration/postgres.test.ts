/**
 * Hotlap on PostgreSQL, read back from the running database (the integration run with
 * HOTLAP_TEST_DB=postgres): the migrations made JSON columns jsonb and the standings change
 * triggers (plpgsql), the triggers bump the counter, the write transactions of two processes
 * never overlap (advisory lock, lib/db.ts), and the queue claim skips a job another claimer holds.
 * Its own database on the run's cluster, through lib/db as the app uses it. Skipped on SQLite.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import crypto from 'node:crypto';
import { QueryTypes, type Sequelize } from 'sequelize';
import pg from 'pg';
import { createDatabase } from '../support/postgres';
import { insertEntrant, insertEntry, insertInspection, insertMachine, insertSeason } from '../support/standings-fixtures';

const cluster = process.env.HOTLAP_TEST_PG_URL;
const dbName = `hotlap_dialect_${crypto.randomBytes(4).toString('hex')}`;
if (cluster) process.env.DATABASE_URL = `${cluster}/${dbName}`;
let sequelize: Sequelize;

const select = <T extends object>(sql: string, replacements?: unknown[]) => sequelize.query<T>(sql, { type: QueryTypes.SELECT, replacements });

describe.skipIf(!cluster)('PostgreSQL dialect', () => {
  beforeAll(async () => {
    createDatabase(cluster!, dbName);
    sequelize = (await import('@/lib/db')).getSequelize();
    await (await import('@/lib/migrate')).migrate();
  });

  afterAll(async () => {
    await sequelize?.close();
  });

  it('runs on PostgreSQL, with every JSON column stored as jsonb', async () => {
    expect(sequelize.getDialect()).toBe('postgres');
    const [{ v }] = await select<{ v: string }>("SELECT current_setting('server_version') AS v");
    expect(Number(v.split('.')[0])).toBeGreaterThanOrEqual(12);
    const cols = await select<{ table_name: string; column_name: string; data_type: string }>(
      `SELECT table_name, column_name, data_type FROM information_schema.columns WHERE table_schema = current_schema() AND data_type IN ('json', 'jsonb') ORDER BY table_name, column_name`,
    );
    const names = cols.map((c) => `${c.table_name}.${c.column_name}`);
    for (const c of ['users.roles', 'inspections.report', 'inspections.rule_results', 'inspections.flags', 'inspections.preview', 'seasons.photo_kinds', 'stored_files.meta', 'reviews.reason_codes', 'audit_events.details', 'entry_reinspections.changes']) {
      expect(names).toContain(c);
    }
    expect(cols.filter((c) => c.data_type !== 'jsonb')).toEqual([]);
  });

  it('has every standings change trigger, as plpgsql functions, and they bump the counter', async () => {
    const { STANDINGS_TRIGGERS } = await import('@/migrations/20261201-0402-standings-version');
    const { PUBLIC_READ_TRIGGERS } = await import('@/migrations/20261203-1801-standings-version-public-reads');
    const { ENTRY_PAGE_TRIGGERS } = await import('@/migrations/20261204-p01-standings-version-entry-pages');
    const rows = await select<{ name: string; lang: string; tbl: string }>(
      `SELECT t.tgname AS name, l.lanname AS lang, c.relname AS tbl FROM pg_trigger t JOIN pg_proc p ON p.oid = t.tgfoid JOIN pg_language l ON l.oid = p.prolang
       JOIN pg_class c ON c.oid = t.tgrelid WHERE NOT t.tgisinternal`,
    );
    const byName = new Map(rows.map((r) => [r.name, r]));
    for (const [name, event] of [...STANDINGS_TRIGGERS, ...PUBLIC_READ_TRIGGERS, ...ENTRY_PAGE_TRIGGERS]) {
      expect(byName.get(name), name).toMatchObject({ lang: 'plpgsql', tbl: /ON (\w+)$/.exec(event)![1] });
    }
    const { listTriggers } = await import('@/lib/dbDialect');
    expect(await listTriggers(sequelize)).toEqual(expect.arrayContaining(['standings_bump_seasons_upd', 'standings_bump_inspections_upd']));

    const version = async () => (await select<{ version: number }>('SELECT version FROM standings_version WHERE id = 1'))[0].version;
    const before = await version();
    await sequelize.query(`INSERT INTO users (email, name, password_hash, roles, created_at, updated_at) VALUES ('pg-test@example.org', 'PG Test', 'x', '["organizer"]', now(), now())`);
    const [{ id: userId }] = await select<{ id: number }>(`SELECT id FROM users WHERE email = 'pg-test@example.org'`);
    // A draft season is inserted (counted: public reads), then renamed (counted).
    await sequelize.query(
      `INSERT INTO seasons (slug, name, host_name, description, state, opens_at, closes_at, created_by_id, created_at, updated_at, photo_kinds)
       VALUES ('pg-season', 'PG season', 'Host', '', 'draft', now(), now() + interval '7 days', ?, now(), now(), '[]')`,
      { replacements: [userId] },
    );
    expect(await version()).toBe(before + 1);
    await sequelize.query(`UPDATE seasons SET name = 'PG season renamed' WHERE slug = 'pg-season'`);
    expect(await version()).toBe(before + 2);
    // A user's e-mail change is not published: not counted (the trigger is on the name column only).
    await sequelize.query(`UPDATE users SET email = 'pg-test2@example.org' WHERE id = ?`, { replacements: [userId] });
    expect(await version()).toBe(before + 2);
    await sequelize.query(`UPDATE users SET name = 'PG Tester' WHERE id = ?`, { replacements: [userId] });
    expect(await version()).toBe(before + 3);
  });

  it('returns JSON columns parsed and counts as numbers through the app connection', async () => {
    const [row] = await select<{ roles: unknown; n: unknown }>(`SELECT roles, (SELECT COUNT(*) FROM users) AS n FROM users WHERE email = 'pg-test2@example.org'`);
    expect(row.roles).toEqual(['organizer']);
    expect(typeof row.n).toBe('number');
  });

  it('write transactions of two processes never overlap: the second waits for the advisory lock', async () => {
    const { PG_WRITE_LOCK_KEY } = await import('@/lib/db');
    // Another process's connection, as a second web server would have.
    const other = new pg.Client({ connectionString: process.env.DATABASE_URL });
    await other.connect();
    try {
      await other.query('BEGIN');
      await other.query(`SELECT pg_advisory_xact_lock(${PG_WRITE_LOCK_KEY})`);
      let entered = false;
      const mine = sequelize.transaction(async () => {
        entered = true;
      });
      // Read the lock table from the running server: our transaction's connection is waiting on the advisory lock.
      let waiting = 0;
      for (let i = 0; i < 100 && !waiting; i++) {
        await new Promise((r) => setTimeout(r, 50));
        waiting = (await other.query(`SELECT COUNT(*)::int AS n FROM pg_locks WHERE locktype = 'advisory' AND NOT granted`)).rows[0].n;
      }
      expect(waiting).toBe(1);
      expect(entered).toBe(false);
      await other.query('COMMIT');
      await mine;
      expect(entered).toBe(true);
    } finally {
      await other.end();
    }
  });

  it('the queue claim passes over a job whose row another claimer holds (FOR UPDATE SKIP LOCKED), then takes it once free', async () => {
    const db = process.env.DATABASE_URL!;
    const season = await insertSeason(db, { classes: ['open'] });
    const jobs: number[] = [];
    for (const name of ['Claim One', 'Claim Two']) {
      const entrant = await insertEntrant(db, name);
      const machine = await insertMachine(db, entrant, `${name} machine`);
      const entry = await insertEntry(db, { seasonId: season.seasonId, classId: season.classIds.open, entrantId: entrant, machineId: machine, timeMs: 1_600_000, submittedAt: '2026-11-20T10:00:00Z', state: 'draft' });
      jobs.push(await insertInspection(db, entry, { peak: null, p95: 0, layerMm: 0.2, status: 'queued' }));
    }
    const { sqlInspectionQueue } = await import('@/lib/jobs/sqlQueue');
    const queue = sqlInspectionQueue({ leaseMs: 60_000, maxAttempts: 3, retryMs: 1000 });
    // Another process is in the middle of claiming the first job: its row is locked.
    const other = new pg.Client({ connectionString: db });
    await other.connect();
    try {
      await other.query('BEGIN');
      await other.query('SELECT id FROM inspections WHERE id = $1 FOR UPDATE', [jobs[0]]);
      expect((await queue.claim(new Date()))?.id).toBe(jobs[1]);
      await other.query('ROLLBACK');
    } finally {
      await other.end();
    }
    expect((await queue.claim(new Date()))?.id).toBe(jobs[0]);
    expect(await queue.claim(new Date())).toBeNull();
    const rows = await select<{ id: number; status: string; attempts: number }>('SELECT id, status, attempts FROM inspections WHERE id IN (?) ORDER BY id', [jobs]);
    expect(rows).toEqual(jobs.map((id) => ({ id, status: 'running', attempts: 1 })));
  });
});
