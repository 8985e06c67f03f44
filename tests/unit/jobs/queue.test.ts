/**
 * The inspection job queue on a fresh SQLite file, without a server: fair claims across entrants,
 * one queued inspection per entry, leases that pass, attempts that run out, and the re-inspection
 * rate limit — each read back from the database the queue writes.
 */
import { describe, it, expect, beforeAll, afterAll, beforeEach } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-jobs-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'hotlap.sqlite')}`;
process.env.HOTLAP_DATA_DIR = dir;
process.env.HOTLAP_REINSPECT_LIMIT = '3';

type Q = typeof import('@/lib/jobs/sqlQueue');
type I = typeof import('@/lib/entries/inspection');
let sqlInspectionQueue: Q['sqlInspectionQueue'];
let insp: I;
let q: (sql: string, params?: unknown[]) => Promise<Record<string, unknown>[]>;
let exec: (sql: string, params?: unknown[]) => Promise<void>;
const stamp = (d: Date) => d.toISOString().replace('T', ' ').replace('Z', ' +00:00');
const T0 = new Date('2026-11-01T00:00:00.000Z');
const settings = { leaseMs: 60_000, maxAttempts: 3, retryMs: 30_000 };

/** entrant id → its entries' ids (entrants 1..3, five entries each). */
const entriesOf: Record<number, number[]> = {};

beforeAll(async () => {
  const { migrate } = await import('@/lib/migrate');
  await migrate();
  ({ sqlInspectionQueue } = await import('@/lib/jobs/sqlQueue'));
  insp = await import('@/lib/entries/inspection');
  const { getSequelize } = await import('@/lib/db');
  const { QueryTypes } = await import('sequelize');
  q = (sql, params = []) => getSequelize().query<Record<string, unknown>>(sql, { replacements: params, type: QueryTypes.SELECT });
  exec = async (sql, params = []) => {
    await getSequelize().query(sql, { replacements: params });
  };
  const t = stamp(T0);
  await exec("INSERT INTO seasons (id, slug, name, host_name, state, opens_at, closes_at, created_at, updated_at) VALUES (1, 's', 'S', 'H', 'open', ?, ?, ?, ?)", [t, t, t, t]);
  await exec("INSERT INTO classes (id, season_id, slug, name, created_at, updated_at) VALUES (1, 1, 'c', 'C', ?, ?)", [t, t]);
  let fileId = 0;
  for (const u of [1, 2, 3]) {
    await exec("INSERT INTO users (id, email, name, password_hash, roles, created_at, updated_at) VALUES (?, ?, ?, 'x', '[]', ?, ?)", [u, `u${u}@example.org`, `U${u}`, t, t]);
    await exec("INSERT INTO machines (id, owner_id, name, motion_system, build_x_mm, build_y_mm, build_z_mm, nozzle_mm, created_at, updated_at) VALUES (?, ?, ?, 'corexy', 1, 1, 1, 0.4, ?, ?)", [u, u, `M${u}`, t, t]);
    entriesOf[u] = [];
    for (let k = 0; k < 25; k++) {
      await exec("INSERT INTO entries (season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, created_at, updated_at) VALUES (1, 1, ?, ?, 'pla', 0.4, 1000000, 'draft', ?, ?)", [u, u, t, t]);
      const [{ id }] = await q('SELECT MAX(id) AS id FROM entries');
      entriesOf[u].push(Number(id));
      for (let f = 0; f < 2; f++) {
        fileId++;
        await exec("INSERT INTO stored_files (id, owner_id, entry_id, kind, original_name, mime, size_bytes, sha256, storage_key, meta, created_at, updated_at) VALUES (?, ?, ?, 'gcode', 'a.gcode', 'text/plain', 1, 'x', ?, '{}', ?, ?)", [fileId, u, id, `k${fileId}`, t, t]);
      }
    }
  }
}, 120_000);

afterAll(async () => {
  const { getSequelize } = await import('@/lib/db');
  await getSequelize().close();
  fs.rmSync(dir, { recursive: true, force: true });
});

beforeEach(async () => {
  await exec('DELETE FROM inspections');
  await exec('DELETE FROM audit_events');
});

const fileOf = async (entryId: number, nth = 0) => Number((await q('SELECT id FROM stored_files WHERE entry_id = ? ORDER BY id', [entryId]))[nth].id);
async function queue(entrant: number, k: number) {
  const entryId = entriesOf[entrant][k];
  return (await insp.queueInspectionRow(entryId, await fileOf(entryId))).row.id;
}
const entrantOfJob = async (id: number) => Number((await q('SELECT e.entrant_id AS u FROM inspections i JOIN entries e ON e.id = i.entry_id WHERE i.id = ?', [id]))[0].u);

describe('fair claims', () => {
  it("one entrant's twenty uploads do not starve another's one: jobs go round-robin by entrant", async () => {
    for (let k = 0; k < 20; k++) await queue(1, k);
    await queue(2, 0); // queued after all twenty
    for (let k = 0; k < 3; k++) await queue(3, k);
    const queueApi = sqlInspectionQueue(settings);
    const order: number[] = [];
    for (;;) {
      const c = await queueApi.claim(T0);
      if (!c) break;
      order.push(await entrantOfJob(c.id));
      // Finish it, as a worker would, so the entrant has nothing running.
      await exec("UPDATE inspections SET status = 'done' WHERE id = ?", [c.id]);
    }
    // Round-robin by entrant (common practice, no source): first turns of 1, 2, 3, then second turns of 1 and 3, …
    expect(order.slice(0, 8)).toEqual([1, 2, 3, 1, 3, 1, 3, 1]);
    expect(order).toHaveLength(24);
    // FIFO would have run entrant 2's job 21st.
    expect(order.indexOf(2)).toBe(1);
  });

  it('an entrant with a job running waits behind one with none', async () => {
    const a1 = await queue(1, 0);
    await queue(1, 1);
    const queueApi = sqlInspectionQueue(settings);
    const first = await queueApi.claim(T0);
    expect(first!.id).toBe(a1);
    const b = await queue(2, 0); // queued later, but entrant 1 already has a turn running
    expect((await queueApi.claim(T0))!.id).toBe(b);
  });
});

describe('one queued inspection per entry', () => {
  it('the database refuses a second queued row for an entry (unique index, read back)', async () => {
    const [idx] = await q("SELECT sql FROM sqlite_master WHERE name = 'inspections_one_queued_per_entry'");
    expect(String(idx.sql)).toMatch(/UNIQUE INDEX.*\(entry_id\) WHERE status = 'queued'/);
    const entryId = entriesOf[1][0];
    await queue(1, 0);
    const t = stamp(T0);
    await expect(
      exec("INSERT INTO inspections (entry_id, stored_file_id, engine_version, status, created_at, updated_at) VALUES (?, ?, 'x', 'queued', ?, ?)", [entryId, await fileOf(entryId), t, t]),
    ).rejects.toMatchObject({ parent: { code: 'SQLITE_CONSTRAINT' } });
  });

  it('queueing the same file again returns the queued row; a newer file supersedes it with a sentence', async () => {
    const entryId = entriesOf[1][0];
    const f0 = await fileOf(entryId, 0);
    const f1 = await fileOf(entryId, 1);
    const a = await insp.queueInspectionRow(entryId, f0);
    const again = await insp.queueInspectionRow(entryId, f0);
    expect(again.created).toBe(false);
    expect(again.row.id).toBe(a.row.id);
    const b = await insp.queueInspectionRow(entryId, f1);
    expect(b.created).toBe(true);
    const rows = await q('SELECT id, status, error FROM inspections WHERE entry_id = ? ORDER BY id', [entryId]);
    expect(rows.map((r) => r.status)).toEqual(['failed', 'queued']);
    expect(rows[0].error).toBe('A newer G-code was uploaded before this inspection started.');
  });

  it('two requests at once still leave one queued row', async () => {
    const entryId = entriesOf[2][3];
    const f0 = await fileOf(entryId, 0);
    const { getSequelize } = await import('@/lib/db');
    await Promise.all([0, 1, 2, 3].map(() => getSequelize().transaction((t) => insp.queueInspectionRow(entryId, f0, t))));
    expect(await q("SELECT id FROM inspections WHERE entry_id = ? AND status = 'queued'", [entryId])).toHaveLength(1);
  });
});

describe('leases and attempts', () => {
  it('a running job whose lease passed is taken again, and the stale claim can no longer write', async () => {
    const id = await queue(1, 0);
    const queueApi = sqlInspectionQueue(settings);
    const c1 = (await queueApi.claim(T0))!;
    expect(c1).toEqual({ id, attempt: 1 });
    const [row] = await q('SELECT status, attempts, lease_until FROM inspections WHERE id = ?', [id]);
    expect(row.status).toBe('running');
    expect(new Date(String(row.lease_until)).getTime()).toBe(T0.getTime() + settings.leaseMs);
    // Within the lease nobody else takes it.
    expect(await queueApi.claim(new Date(T0.getTime() + 30_000))).toBeNull();
    const later = new Date(T0.getTime() + settings.leaseMs + 1);
    const c2 = (await queueApi.claim(later))!;
    expect(c2).toEqual({ id, attempt: 2 });
    expect(await queueApi.renew(c1, later)).toBe(false);
    expect(await queueApi.fail(c1, 'stale')).toBe(false);
    expect(await queueApi.renew(c2, later)).toBe(true);
  });

  it('a row left running without a lease (a server before leases, or killed before its first renewal) is taken again', async () => {
    const entryId = entriesOf[3][0];
    const t = stamp(T0);
    await exec("INSERT INTO inspections (entry_id, stored_file_id, engine_version, status, created_at, updated_at) VALUES (?, ?, 'x', 'running', ?, ?)", [entryId, await fileOf(entryId), t, t]);
    const [{ id }] = await q('SELECT MAX(id) AS id FROM inspections');
    expect(await sqlInspectionQueue(settings).claim(T0)).toEqual({ id: Number(id), attempt: 1 });
  });

  it('a job that crashed on our side is taken again after a pause that grows with its attempts', async () => {
    const id = await queue(1, 0);
    const queueApi = sqlInspectionQueue(settings);
    const c1 = (await queueApi.claim(T0))!;
    await queueApi.release(c1, 'The inspection stopped unexpectedly on our side; it will be tried again.', T0);
    expect(await queueApi.claim(new Date(T0.getTime() + settings.retryMs - 1))).toBeNull();
    const t2 = new Date(T0.getTime() + settings.retryMs + 1);
    const c2 = (await queueApi.claim(t2))!;
    expect(c2).toEqual({ id, attempt: 2 });
    await queueApi.release(c2, 'again', t2);
    // Second pause: twice as long.
    expect(await queueApi.claim(new Date(t2.getTime() + settings.retryMs + 1))).toBeNull();
    expect((await queueApi.claim(new Date(t2.getTime() + 2 * settings.retryMs + 1)))!.attempt).toBe(3);
  });

  it('after the last attempt a job whose lease passed fails with a sentence', async () => {
    const id = await queue(1, 0);
    const queueApi = sqlInspectionQueue(settings);
    let now = T0.getTime();
    for (let k = 1; k <= settings.maxAttempts; k++) {
      expect((await queueApi.claim(new Date(now)))!.attempt).toBe(k);
      now += settings.leaseMs + 1;
    }
    expect(await queueApi.claim(new Date(now))).toBeNull();
    expect(await queueApi.expire(new Date(now))).toBe(1);
    const [row] = await q('SELECT status, error FROM inspections WHERE id = ?', [id]);
    expect(row.status).toBe('failed');
    expect(row.error).toMatch(/started 3 times and never finished; use "Inspect again"/);
  });
});

describe('re-inspection rate limit', () => {
  it('answers 429 with a sentence once an entrant asked too often in the window', async () => {
    const t = (ms: number) => stamp(new Date(T0.getTime() + ms));
    for (let k = 0; k < 3; k++)
      await exec("INSERT INTO audit_events (actor_id, action, subject_type, subject_id, details, created_at) VALUES (1, 'entry.reinspected', 'entry', '1', '{}', ?)", [t(k * 60_000)]);
    const now = new Date(T0.getTime() + 3 * 60_000);
    const err = await insp.checkReinspectRate(1, undefined, now).catch((e: unknown) => e);
    expect(err).toMatchObject({ status: 429 });
    expect((err as Error).message).toBe('You asked for 3 re-inspections in the last 10 minutes, the most we run for one entrant; try again in 7 minutes.');
    // Another entrant is not held back; and the window passes.
    await expect(insp.checkReinspectRate(2, undefined, now)).resolves.toBeUndefined();
    await expect(insp.checkReinspectRate(1, undefined, new Date(T0.getTime() + 10 * 60_000 + 1))).resolves.toBeUndefined();
  });
});
