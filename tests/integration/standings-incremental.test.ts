/**
 * The incremental standings refresh (lib/standings/changes.ts) against a full re-rank, on the
 * database of the run (its own SQLite file, or its own database on the run's PostgreSQL cluster with
 * HOTLAP_TEST_DB=postgres), through lib/standings as the app uses it:
 *
 * - a seeded random sequence of writes (verify, reject, withdraw, new verified entries, re-inspections
 *   with new figures, failed inspections, claimed-time edits, entrant and machine renames, entries
 *   moving class or machine, deletions; single writes and several in one transaction; writes that
 *   commit while a refresh is reading) keeps two caches — one refreshed after every step, one every
 *   few steps — equal to a fresh ranking, row for row, in both classes;
 * - the refreshes were incremental (the change log was used), and a log that no longer reaches back
 *   (pruned) falls back to a full re-rank that is still right.
 *
 * The writes are plain SQL: the change log is written by the database's triggers, so every path
 * that changes these columns (judges' decisions, withdrawals, re-inspections, renames) logs the same way.
 */
import { describe, it, expect, beforeAll, afterAll, vi } from 'vitest';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { createDatabase } from '../support/postgres';
import { mulberry32 } from '../support/prng';
import { sql as otherConnection } from '../support/db';

const cluster = process.env.HOTLAP_TEST_PG_URL;
const dbName = `hotlap_incr_${crypto.randomBytes(4).toString('hex')}`;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-incr-'));
const dbRef = cluster ? `${cluster}/${dbName}` : path.join(dir, 'hotlap.sqlite');
process.env.DATABASE_URL = cluster ? dbRef : `sqlite:${dbRef}`;
process.env.HOTLAP_DATA_DIR = dir;

type Lib = typeof import('@/lib/standings');
let serverA: Lib;
let serverB: Lib;
let seq: Sequelize;
let seasonId: number;
let classIds: number[];
const users: number[] = [];
const machines: number[] = [];
const stamp = (ms: number) => new Date(ms).toISOString().replace('T', ' ').replace('Z', ' +00:00');
const T0 = Date.parse('2026-11-10T12:00:00Z');

async function run(query: string, replacements: unknown[] = [], transaction?: Transaction) {
  await seq.query(query, { replacements, transaction });
}
async function select<T extends object>(query: string, replacements: unknown[] = [], transaction?: Transaction) {
  return seq.query<T>(query, { replacements, type: QueryTypes.SELECT, transaction });
}
/** Inserts and returns the new id (writes are serialized: the newest id is ours; Sequelize's SQLite
 * dialect does not return the rows of INSERT … RETURNING through a raw query). */
async function insertId(query: string, replacements: unknown[], transaction?: Transaction): Promise<number> {
  await run(query, replacements, transaction);
  const table = /INSERT INTO (\w+)/.exec(query)![1];
  const [row] = await select<{ id: number }>(`SELECT MAX(id) AS id FROM ${table}`, [], transaction);
  return Number(row.id);
}

beforeAll(async () => {
  if (cluster) createDatabase(cluster, dbName);
  await (await import('@/lib/migrate')).migrate();
  seq = (await import('@/lib/db')).getSequelize();
  serverA = await import('@/lib/standings');
  // A second module instance: its own ranking cache and counter reader, as another web server has.
  vi.resetModules();
  serverB = await import('@/lib/standings');
  expect(serverB).not.toBe(serverA);
  const t = stamp(T0);
  seasonId = await insertId("INSERT INTO seasons (slug, name, host_name, description, state, opens_at, closes_at, created_at, updated_at) VALUES ('incr', 'Incr', 'Club', '', 'open', ?, ?, ?, ?)", [t, t, t, t]);
  classIds = [];
  for (const c of ['a', 'b']) classIds.push(await insertId('INSERT INTO classes (season_id, slug, name, display_order, created_at, updated_at) VALUES (?, ?, ?, 0, ?, ?)', [seasonId, c, c, t, t]));
  for (let i = 0; i < 14; i++) {
    const u = await insertId("INSERT INTO users (email, name, password_hash, roles, created_at, updated_at) VALUES (?, ?, 'x', '[\"entrant\"]', ?, ?)", [`incr${i}@example.org`, `Entrant ${i}`, t, t]);
    users.push(u);
    machines.push(await insertId("INSERT INTO machines (owner_id, name, motion_system, build_x_mm, build_y_mm, build_z_mm, nozzle_mm, created_at, updated_at) VALUES (?, ?, 'corexy', 200, 200, 200, 0.4, ?, ?)", [u, `Machine ${i}`, t, t]));
  }
}, 180_000);

afterAll(async () => {
  await seq?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const refs = () => classIds.map((classId) => ({ seasonId, classId, frozen: false }));

/** Fresh rankings (no cache) of both classes against what a server's cache gives. */
async function expectSameAsFresh(lib: Lib, label: string) {
  for (const ref of refs()) {
    const kept = await lib.rankedRows(ref);
    const fresh = await serverA.computeRanked(ref);
    expect(kept, `${label}, class ${ref.classId}`).toEqual(fresh);
  }
}

/** One random write (or a few in one transaction); the same seed gives the same sequence. */
function writer(rand: () => number) {
  const pick = <T>(xs: T[]): T => xs[Math.floor(rand() * xs.length)];
  // Few distinct times and dates, so ties on time (and on time and date) are common; some dates missing.
  const time = () => 1_000_000 + 1000 * Math.floor(rand() * 12);
  const date = () => (rand() < 0.1 ? null : stamp(T0 + 60_000 * Math.floor(rand() * 8)));
  const anyEntry = async (t: Transaction, where: string) => {
    const rows = await select<{ id: number }>(`SELECT id FROM entries WHERE season_id = ? AND ${where} ORDER BY id`, [seasonId], t);
    return rows.length ? Number(pick(rows).id) : null;
  };
  const inspect = async (t: Transaction, entryId: number, status = 'done') => {
    const n = stamp(Date.now());
    await run(
      'INSERT INTO inspections (entry_id, engine_version, status, peak_flow_mm3s, p95_flow_mm3s, layer_height_mm, estimated_time_s, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, 1500, ?, ?)',
      [entryId, 'test', status, Math.round(rand() * 400) / 10, Math.round(rand() * 300) / 10, pick([0.2, 0.25, 0.3]), n, n],
      t,
    );
  };
  const newEntry: [string, (t: Transaction) => Promise<void>] =
    ['new entry', async (t) => {
      const i = Math.floor(rand() * users.length);
      const st = pick(['verified', 'verified', 'submitted']);
      const n = stamp(Date.now());
      const id = await insertId(
        'INSERT INTO entries (season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, submitted_at, created_at, updated_at) VALUES (?, ?, ?, ?, ?, 0.4, ?, ?, ?, ?, ?)',
        [seasonId, pick(classIds), users[i], machines[i], pick(['pla', 'petg']), time(), st, date(), n, n],
        t,
      );
      if (rand() < 0.8) await inspect(t, id);
    }];
  // New entries three times as likely as any other write, so the classes keep a ranking to move.
  const kinds: [string, (t: Transaction) => Promise<void>][] = [
    newEntry,
    newEntry,
    newEntry,
    ['verify', async (t) => {
      const id = await anyEntry(t, "state IN ('submitted', 'rejected', 'withdrawn')");
      if (id) await run("UPDATE entries SET state = 'verified' WHERE id = ?", [id], t);
    }],
    ['reject', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id) await run("UPDATE entries SET state = 'rejected' WHERE id = ?", [id], t);
    }],
    ['withdraw', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id) await run("UPDATE entries SET state = 'withdrawn' WHERE id = ?", [id], t);
    }],
    ['re-inspection', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id) await inspect(t, id, pick(['done', 'done', 'failed']));
    }],
    ['figures edited', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id) await run("UPDATE inspections SET peak_flow_mm3s = ? WHERE entry_id = ? AND status = 'done'", [Math.round(rand() * 400) / 10, id], t);
    }],
    ['claimed time edit', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id) await run('UPDATE entries SET claimed_time_ms = ?, submitted_at = ? WHERE id = ?', [time(), date(), id], t);
    }],
    ['entrant rename', async (t) => {
      await run('UPDATE users SET name = ? WHERE id = ?', [`Entrant ${Math.floor(rand() * 1e6)}`, pick(users)], t);
    }],
    ['machine rename', async (t) => {
      await run('UPDATE machines SET name = ?, motion_system = ? WHERE id = ?', [`Machine ${Math.floor(rand() * 1e6)}`, pick(['corexy', 'delta', 'cartesian']), pick(machines)], t);
    }],
    ['moves class', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id) await run('UPDATE entries SET class_id = CASE WHEN class_id = ? THEN ? ELSE ? END WHERE id = ?', [classIds[0], classIds[1], classIds[0], id], t);
    }],
    ['other machine', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id) await run('UPDATE entries SET machine_id = ? WHERE id = ?', [pick(machines), id], t);
    }],
    ['deleted', async (t) => {
      const id = await anyEntry(t, "state = 'verified'");
      if (id && rand() < 0.5) {
        await run('DELETE FROM inspections WHERE entry_id = ?', [id], t);
        await run('DELETE FROM entries WHERE id = ?', [id], t);
      }
    }],
  ];
  return async (only?: 'new entry'): Promise<string[]> => {
    const n = rand() < 0.2 ? 2 + Math.floor(rand() * 3) : 1;
    const done: string[] = [];
    await seq.transaction(async (t) => {
      for (let i = 0; i < n; i++) {
        const [name, write] = only ? newEntry : pick(kinds);
        await write(t);
        done.push(name);
      }
    });
    return done;
  };
}

describe('incremental standings refresh', () => {
  it('after random writes, two servers kept rankings equal a fresh ranking, row for row', async () => {
    const write = writer(mulberry32(20261204));
    for (let i = 0; i < 40; i++) await write('new entry');
    await expectSameAsFresh(serverA, 'start');
    await expectSameAsFresh(serverB, 'start');
    const before = serverA.refreshCounts();
    for (let step = 0; step < 150; step++) {
      // Now and then a write commits while server A refreshes: nothing may be lost.
      const done = step % 7 === 3 ? (await Promise.all([write(), serverA.rankedRows(refs()[0])]))[0] : await write();
      await expectSameAsFresh(serverA, `A, step ${step} (${done.join(', ')})`);
      if (step % 5 === 4) await expectSameAsFresh(serverB, `B, step ${step}`);
    }
    const after = serverA.refreshCounts();
    // The change log carried the refreshes: no full re-rank after the start, many incremental ones.
    expect(after.incremental - before.incremental).toBeGreaterThan(100);
    const fallbacks = (c: typeof after) => c.pruned + c.too_many + c.unknown_kind + c.base_failed + c.log_failed;
    expect(fallbacks(after)).toBe(fallbacks(before));
    for (const ref of refs()) expect((await serverA.rankedRows(ref)).length).toBeGreaterThan(3);
  });

  it('writes committed by another connection while a server refreshes are never lost', async () => {
    const rand = mulberry32(7);
    const ref = refs()[1];
    const ids = (await select<{ id: number }>("SELECT id FROM entries WHERE season_id = ? AND state = 'verified' ORDER BY id", [seasonId])).map((r) => Number(r.id));
    const before = serverA.refreshCounts();
    let writing = true;
    const writer = (async () => {
      for (let i = 0; i < 40; i++) {
        const id = ids[Math.floor(rand() * ids.length)];
        // Its own connection (another process, as far as the database can tell): no in-process write queue.
        if (rand() < 0.7) await otherConnection(dbRef, 'UPDATE entries SET claimed_time_ms = ? WHERE id = ?', [1_000_000 + Math.floor(rand() * 12) * 1000, id]);
        else await otherConnection(dbRef, "UPDATE entries SET state = CASE WHEN state = 'verified' THEN 'rejected' ELSE 'verified' END WHERE id = ?", [id]);
      }
      writing = false;
    })();
    let reads = 0;
    while (writing) {
      await Promise.all([serverA.rankedRows(ref), serverA.rankedRows(ref), serverB.rankedRows(ref)]);
      reads += 1;
    }
    await writer;
    expect(reads).toBeGreaterThan(1);
    await expectSameAsFresh(serverA, 'A after the concurrent writes');
    await expectSameAsFresh(serverB, 'B after the concurrent writes');
    expect(serverA.refreshCounts().incremental).toBeGreaterThan(before.incremental);
  });

  it('the newest finished inspection is looked up through its index', async () => {
    if (cluster) {
      // Read back from the catalogue (on a table this small the planner may prefer a scan).
      const [ix] = await select<{ def: string }>("SELECT indexdef AS def FROM pg_indexes WHERE indexname = 'inspections_newest_done'");
      expect(ix.def).toMatch(/ON (public\.)?inspections USING btree \(entry_id, status, created_at, id\)/);
      return;
    }
    const plan = (await serverA.explainLiveRanking(seasonId, classIds[0])).join('\n');
    expect(plan).toMatch(/SEARCH i2 USING COVERING INDEX inspections_newest_done \(entry_id=\? AND status=\?\)/);
  });

  it('the change log rows carry the counter value of their bump, in the same transaction', async () => {
    const [{ version: v0 }] = await select<{ version: number }>('SELECT version FROM standings_version WHERE id = 1');
    const [{ id }] = await select<{ id: number }>("SELECT id FROM entries WHERE state = 'verified' AND class_id = ? ORDER BY id LIMIT 1", [classIds[0]]);
    await run('UPDATE entries SET claimed_time_ms = claimed_time_ms + 1 WHERE id = ?', [id]);
    const [{ version: v1 }] = await select<{ version: number }>('SELECT version FROM standings_version WHERE id = 1');
    expect(Number(v1)).toBe(Number(v0) + 1);
    const log = await select<{ version: number; kind: string; ref_id: number; season_id: number; class_id: number }>('SELECT version, kind, ref_id, season_id, class_id FROM standings_changes WHERE version > ?', [v0]);
    expect(log.map((r) => ({ ...r, version: Number(r.version) }))).toEqual(expect.arrayContaining([{ version: Number(v1), kind: 'entry', ref_id: Number(id), season_id: seasonId, class_id: classIds[0] }]));
    // A rolled-back write leaves neither the bump nor its log row.
    await expect(
      seq.transaction(async (t) => {
        await run('UPDATE entries SET claimed_time_ms = claimed_time_ms + 1 WHERE id = ?', [id], t);
        throw new Error('roll back');
      }),
    ).rejects.toThrow('roll back');
    const [{ version: v2 }] = await select<{ version: number }>('SELECT version FROM standings_version WHERE id = 1');
    expect(Number(v2)).toBe(Number(v1));
    expect(await select('SELECT version FROM standings_changes WHERE version > ?', [v1])).toEqual([]);
  });

  it('falls back to a full re-rank, still right, when the log no longer reaches back', async () => {
    const { STANDINGS_CHANGES_KEPT } = await import('@/migrations/20261204-r01-standings-changes');
    const ref = refs()[0];
    await serverA.rankedRows(ref);
    await serverB.rankedRows(ref);
    // More counter values than the log keeps, from writes in another season (none touch this class)…
    const t = stamp(T0);
    const other = await insertId("INSERT INTO seasons (slug, name, host_name, description, state, opens_at, closes_at, created_at, updated_at) VALUES ('incr-other', 'Other', 'Club', '', 'open', ?, ?, ?, ?)", [t, t, t, t]);
    const otherClass = await insertId("INSERT INTO classes (season_id, slug, name, display_order, created_at, updated_at) VALUES (?, 'o', 'o', 0, ?, ?)", [other, t, t]);
    const n = STANDINGS_CHANGES_KEPT + 10;
    await run(
      `WITH RECURSIVE g(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM g WHERE i < ${n})
       INSERT INTO entries (season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, submitted_at, created_at, updated_at)
       SELECT ?, ?, ?, ?, 'pla', 0.4, 1000000 + i, 'verified', ?, ?, ? FROM g`,
      [other, otherClass, users[0], machines[0], t, t, t],
    );
    // … then one that does: server A must see it although the log lost the start of the gap.
    const [{ id }] = await select<{ id: number }>("SELECT id FROM entries WHERE state = 'verified' AND class_id = ? ORDER BY claimed_time_ms DESC, id DESC LIMIT 1", [ref.classId]);
    await run('UPDATE entries SET claimed_time_ms = 1 WHERE id = ?', [id]);
    // The triggers pruned the log to the newest KEPT counter values.
    const [{ n: logRows, lo }] = await select<{ n: number; lo: number }>('SELECT COUNT(*) AS n, MIN(version) AS lo FROM standings_changes');
    const [{ version }] = await select<{ version: number }>('SELECT version FROM standings_version WHERE id = 1');
    expect(Number(logRows)).toBeLessThanOrEqual(STANDINGS_CHANGES_KEPT);
    expect(Number(lo)).toBeGreaterThan(Number(version) - STANDINGS_CHANGES_KEPT);
    const before = serverA.refreshCounts();
    const rows = await serverA.rankedRows(ref);
    expect(serverA.refreshCounts().pruned).toBe(before.pruned + 1);
    expect(rows[0]).toMatchObject({ entry_id: Number(id), rank: 1, time_ms: 1 });
    expect(rows).toEqual(await serverA.computeRanked(ref));
    // Server B, cleared (a restarted server) and kept, agree.
    expect(await serverB.rankedRows(ref)).toEqual(rows);
    serverB.clearStandingsCache();
    expect(await serverB.rankedRows(ref)).toEqual(rows);
    // And the log carries on from there: the next change is incremental again.
    await run('UPDATE users SET name = ? WHERE id = ?', ['Renamed at the end', rows[0].entrant_id]);
    const mid = serverA.refreshCounts();
    expect((await serverA.rankedRows(ref))[0]).toMatchObject({ entrant: 'Renamed at the end' });
    expect(serverA.refreshCounts().incremental).toBe(mid.incremental + 1);
  });
});
