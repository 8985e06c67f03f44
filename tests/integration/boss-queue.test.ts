/**
 * The inspection queue on PostgreSQL (lib/jobs/bossQueue.ts), read back from pg-boss's own tables
 * and the inspections rows: sending is idempotent per attempt, jobs come out round-robin by entrant
 * (priority by rank), a row is claimed by one of two workers holding jobs for it, a claim whose
 * lease passed is taken again under the next attempt, and a stale attempt writes nothing.
 * Its own database on the run's cluster (HOTLAP_TEST_DB=postgres); skipped on SQLite.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import crypto from 'node:crypto';
import { QueryTypes, type Sequelize } from 'sequelize';
import { createDatabase } from '../support/postgres';

const cluster = process.env.HOTLAP_TEST_PG_URL || process.env.HOTLAP_TEST_POSTGRES_URL;
const dbName = `hotlap_boss_${crypto.randomBytes(4).toString('hex')}`;
if (cluster) {
  process.env.DATABASE_URL = `${cluster}/${dbName}`;
  process.env.HOTLAP_JOB_LEASE_MS = '60000';
}
let sequelize: Sequelize;
let boss: typeof import('@/lib/jobs/bossQueue');
let settings: import('@/lib/jobs/settings').JobSettings;

const select = <T extends object>(sql: string, replacements?: unknown[]) => sequelize.query<T>(sql, { type: QueryTypes.SELECT, replacements });

/** A queued inspection row for a new entry of `entrantId` (season, class, machine of the demo-less schema made here). */
async function queuedRow(ids: { season: number; cls: number }, entrantId: number, machineId: number): Promise<number> {
  const [{ id: entryId }] = await select<{ id: number }>(
    "INSERT INTO entries (season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, created_at, updated_at) VALUES (?, ?, ?, ?, 'pla', 0.4, 1500000, 'draft', now(), now()) RETURNING id",
    [ids.season, ids.cls, entrantId, machineId],
  );
  const [{ id }] = await select<{ id: number }>("INSERT INTO inspections (entry_id, engine_version, status, created_at, updated_at) VALUES (?, 'test', 'queued', now(), now()) RETURNING id", [entryId]);
  return id;
}

describe.skipIf(!cluster)('the pg-boss inspection queue', () => {
  const rows: Record<string, number> = {};

  beforeAll(async () => {
    createDatabase(cluster!, dbName);
    sequelize = (await import('@/lib/db')).getSequelize();
    await (await import('@/lib/migrate')).migrate();
    boss = await import('@/lib/jobs/bossQueue');
    settings = (await import('@/lib/jobs/settings')).jobSettings();
    expect(settings.queue).toBe('pg-boss');
    const [{ id: season }] = await select<{ id: number }>(
      "INSERT INTO seasons (slug, name, host_name, description, state, opens_at, closes_at, created_at, updated_at) VALUES ('q', 'Queue season', 'Test club', '', 'open', now(), now() + interval '30 days', now(), now()) RETURNING id",
    );
    const [{ id: cls }] = await select<{ id: number }>("INSERT INTO classes (season_id, slug, name, display_order, created_at, updated_at) VALUES (?, 'open', 'Open', 0, now(), now()) RETURNING id", [season]);
    const people: Record<string, { user: number; machine: number }> = {};
    for (const who of ['ada', 'bo']) {
      const [{ id: user }] = await select<{ id: number }>("INSERT INTO users (email, name, password_hash, created_at, updated_at) VALUES (?, ?, 'x', now(), now()) RETURNING id", [`${who}@example.org`, who]);
      const [{ id: machine }] = await select<{ id: number }>(
        "INSERT INTO machines (owner_id, name, motion_system, build_x_mm, build_y_mm, build_z_mm, nozzle_mm, created_at, updated_at) VALUES (?, 'Rig', 'corexy', 250, 250, 250, 0.4, now(), now()) RETURNING id",
        [user],
      );
      people[who] = { user, machine };
    }
    // Ada queues three, then Bo one: a FIFO queue would run all of Ada's first.
    for (const k of ['ada1', 'ada2', 'ada3']) rows[k] = await queuedRow({ season, cls }, people.ada.user, people.ada.machine);
    rows.bo1 = await queuedRow({ season, cls }, people.bo.user, people.bo.machine);
  });

  afterAll(async () => {
    await boss?.stopBoss();
    await sequelize?.close();
  });

  it('sends one job per waiting row and attempt, however often it is asked', async () => {
    expect(await boss.enqueueWaiting(settings, 'worker')).toBe(4);
    expect(await boss.enqueueWaiting(settings, 'worker')).toBe(0);
    const jobs = await select<{ key: string; priority: number; state: string }>("SELECT singleton_key AS key, priority, state FROM pgboss.job WHERE name = 'inspection' ORDER BY singleton_key");
    expect(jobs.map((j) => j.key).sort()).toEqual(Object.values(rows).map((id) => `inspection:${id}:0`).sort());
    // Rank among the entrant's waiting rows, as priority (higher first): Ada 0, -1, -2; Bo 0.
    const byKey = Object.fromEntries(jobs.map((j) => [j.key, j.priority]));
    expect([rows.ada1, rows.ada2, rows.ada3, rows.bo1].map((id) => byKey[`inspection:${id}:0`])).toEqual([0, -1, -2, 0]);
  });

  it('hands the rows out round-robin by entrant, and a claim is conditional on the row', async () => {
    const queue = boss.bossInspectionQueue(settings);
    const now = new Date();
    const order: number[] = [];
    for (let i = 0; i < 4; i++) {
      const c = await queue.claim(now);
      expect(c).not.toBeNull();
      expect(c!.attempt).toBe(1);
      order.push(c!.id);
      await queue.done!(c!);
    }
    // Each entrant's first before anyone's second (ties by age): Ada's first, Bo's first, then Ada's others.
    expect(order).toEqual([rows.ada1, rows.bo1, rows.ada2, rows.ada3]);
    expect(await queue.claim(now)).toBeNull();
    const states = await select<{ status: string; attempts: number }>('SELECT status, attempts FROM inspections WHERE id IN (?) ORDER BY id', [Object.values(rows)]);
    expect(states.every((s) => s.status === 'running' && s.attempts === 1)).toBe(true);
  });

  it('takes a row again once its lease passed (a dead worker), under the next attempt; the old attempt writes nothing', async () => {
    const queue = boss.bossInspectionQueue(settings);
    // Not yet: the lease (60 s) still holds, so the sweep sends nothing and nothing can be claimed.
    expect(await boss.enqueueWaiting(settings, 'worker', new Date())).toBe(0);
    const later = new Date(Date.now() + 120_000);
    expect(await boss.enqueueWaiting(settings, 'worker', later)).toBe(4);
    const keys = await select<{ key: string }>("SELECT singleton_key AS key FROM pgboss.job WHERE name = 'inspection' AND state = 'created' ORDER BY singleton_key");
    expect(keys.map((k) => k.key).sort()).toEqual(Object.values(rows).map((id) => `inspection:${id}:1`).sort());
    const c = await queue.claim(later);
    expect(c).toMatchObject({ id: rows.ada1, attempt: 2 });
    // The first attempt's holder (still alive somewhere) can neither renew, fail nor release it.
    const stale = { id: rows.ada1, attempt: 1 };
    expect(await queue.renew(stale, later)).toBe(false);
    expect(await queue.fail(stale, 'stale')).toBe(false);
    expect(await queue.fail(c!, 'The current attempt ends it.')).toBe(true);
    await queue.done!(c!);
    const [row] = await select<{ status: string; attempts: number; error: string }>('SELECT status, attempts, error FROM inspections WHERE id = ?', [rows.ada1]);
    expect(row).toEqual({ status: 'failed', attempts: 2, error: 'The current attempt ends it.' });
  });
});
