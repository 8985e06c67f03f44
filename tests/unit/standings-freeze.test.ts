/**
 * freezeStandings and the ranking cache on a fresh SQLite file, without a server: a frozen season
 * never moves, freezing is idempotent and works inside the caller's transaction, and the cache
 * sees every write through the change triggers.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-freeze-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'hotlap.sqlite')}`;
process.env.HOTLAP_DATA_DIR = dir;

type Lib = typeof import('@/lib/standings');
let lib: Lib;
let q: (sql: string, params?: unknown[]) => Promise<Record<string, unknown>[]>;
let exec: (sql: string, params?: unknown[]) => Promise<void>;
let seasonId: number;
let classId: number;
const stamp = (iso: string) => iso.replace('T', ' ').replace('Z', ' +00:00');

beforeAll(async () => {
  const { migrate } = await import('@/lib/migrate');
  await migrate();
  lib = await import('@/lib/standings');
  const { getSequelize } = await import('@/lib/db');
  const { QueryTypes } = await import('sequelize');
  q = (sql, params = []) => getSequelize().query<Record<string, unknown>>(sql, { replacements: params, type: QueryTypes.SELECT });
  exec = async (sql, params = []) => {
    await getSequelize().query(sql, { replacements: params });
  };
  const t = stamp('2026-11-01T00:00:00.000Z');
  seasonId = 1;
  classId = 1;
  await exec("INSERT INTO seasons (id, slug, name, host_name, state, opens_at, closes_at, created_at, updated_at) VALUES (1, 's', 'S', 'H', 'judging', ?, ?, ?, ?)", [t, t, t, t]);
  await exec("INSERT INTO classes (id, season_id, slug, name, created_at, updated_at) VALUES (1, 1, 'c', 'C', ?, ?)", [t, t]);
  for (const [i, name, timeMs] of [[1, 'Alba', 1_000_000], [2, 'Brin', 1_100_000]] as const) {
    await exec("INSERT INTO users (id, email, name, password_hash, roles, created_at, updated_at) VALUES (?, ?, ?, 'x', '[]', ?, ?)", [i, `${name}@example.org`, name, t, t]);
    await exec("INSERT INTO machines (id, owner_id, name, motion_system, build_x_mm, build_y_mm, build_z_mm, nozzle_mm, created_at, updated_at) VALUES (?, ?, ?, 'corexy', 1, 1, 1, 0.4, ?, ?)", [i, i, `${name} box`, t, t]);
    await exec("INSERT INTO entries (season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, submitted_at, created_at, updated_at) VALUES (?, ?, ?, ?, 'pla', 0.4, ?, 'verified', ?, ?, ?)", [seasonId, classId, i, i, timeMs, t, t, t]);
  }
  // Migrating a fresh file takes a few seconds on a busy 2-core machine.
}, 120_000);

afterAll(async () => {
  const { getSequelize } = await import('@/lib/db');
  await getSequelize().close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const live = () => ({ seasonId, classId, frozen: false });
const frozen = () => ({ seasonId, classId, frozen: true });
const names = async (ref: { seasonId: number; classId: number; frozen: boolean }) => (await lib.rankedRows(ref)).map((r) => r.entrant);

describe('ranking cache', () => {
  it('the live ranking follows every write, through the change triggers', async () => {
    expect(await names(live())).toEqual(['Alba', 'Brin']);
    await exec("UPDATE entries SET claimed_time_ms = 900000 WHERE entrant_id = 2");
    expect(await names(live())).toEqual(['Brin', 'Alba']);
    await exec("UPDATE users SET name = 'Brindle' WHERE id = 2");
    expect(await names(live())).toEqual(['Brindle', 'Alba']);
    await exec('UPDATE entries SET claimed_time_ms = 1100000 WHERE entrant_id = 2');
    expect(await names(live())).toEqual(['Alba', 'Brindle']);
  });

  it('only writes that touch verified entries bump the change counter', async () => {
    const version = async () => Number((await q('SELECT version FROM standings_version'))[0].version);
    const t = stamp('2026-11-02T00:00:00.000Z');
    const v0 = await version();
    await exec("INSERT INTO entries (id, season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, submitted_at, created_at, updated_at) VALUES (99, 1, 1, 1, 1, 'pla', 0.4, 800000, 'submitted', ?, ?, ?)", [t, t, t]);
    await exec("INSERT INTO inspections (entry_id, engine_version, status, created_at, updated_at) VALUES (99, 't', 'done', ?, ?)", [t, t]);
    await exec("UPDATE entries SET notes = 'edited' WHERE id = 99");
    expect(await version()).toBe(v0);
    await exec("UPDATE entries SET state = 'verified' WHERE id = 99");
    expect(await version()).toBe(v0 + 1);
    expect(await names(live())).toEqual(['Alba', 'Brindle']);
    await exec("UPDATE inspections SET peak_flow_mm3s = 41 WHERE entry_id = 99");
    expect(await version()).toBe(v0 + 2);
    expect((await lib.rankedRows(live()))[0]).toMatchObject({ entry_id: 99, peak_flow_mm3s: 41 });
    await exec("UPDATE entries SET state = 'rejected' WHERE id = 99");
    expect(await version()).toBe(v0 + 3);
    expect((await lib.rankedRows(live()))[0].entry_id).not.toBe(99);
  });

  it('the query plan searches the standings index', async () => {
    const plan = await lib.explainLiveRanking(seasonId, classId);
    expect(plan.join('\n')).toMatch(/SEARCH e USING (COVERING )?INDEX entries_standings \(season_id=\? AND class_id=\? AND state=\?\)/);
  });
});

describe('freezeStandings', () => {
  it('snapshots every class inside the caller transaction, once', async () => {
    const { getSequelize } = await import('@/lib/db');
    const result = await getSequelize().transaction(async (t) => {
      await getSequelize().query("UPDATE seasons SET state = 'final' WHERE id = ?", { replacements: [seasonId], transaction: t });
      return lib.freezeStandings(seasonId, t);
    });
    expect(result).toMatchObject({ created: true, rows: 2 });
    const again = await lib.freezeStandings(seasonId);
    expect(again).toMatchObject({ created: false, rows: 2, frozenAt: result.frozenAt });
    expect((await q('SELECT COUNT(*) AS n FROM standings_snapshots WHERE season_id = ?', [seasonId]))[0].n).toBe(2);
  });

  it('later decisions do not change the frozen standings', async () => {
    const before = await lib.rankedRows(frozen());
    await exec("UPDATE entries SET state = 'rejected' WHERE entrant_id = 1");
    await exec("UPDATE machines SET name = 'Renamed' WHERE id = 2");
    lib.clearStandingsCache();
    const after = await lib.rankedRows(frozen());
    expect(after).toEqual(before);
    expect(after.map((r) => [r.rank, r.entrant, r.machine])).toEqual([[1, 'Alba', 'Alba box'], [2, 'Brindle', 'Brin box']]);
    // The live ranking has moved on; the published one has not.
    expect(await names(live())).toEqual(['Brindle']);
  });

  it('a transaction that fails leaves no snapshot behind', async () => {
    const t = stamp('2026-11-01T00:00:00.000Z');
    const other = 2;
    await exec("INSERT INTO seasons (id, slug, name, host_name, state, opens_at, closes_at, created_at, updated_at) VALUES (2, 's2', 'S2', 'H', 'judging', ?, ?, ?, ?)", [t, t, t, t]);
    await exec("INSERT INTO classes (id, season_id, slug, name, created_at, updated_at) VALUES (2, 2, 'c', 'C', ?, ?)", [t, t]);
    const { getSequelize } = await import('@/lib/db');
    await expect(
      getSequelize().transaction(async (tx) => {
        await lib.freezeStandings(other, tx);
        throw new Error('the season transition failed');
      }),
    ).rejects.toThrow('the season transition failed');
    expect(await q('SELECT * FROM standings_freezes WHERE season_id = ?', [other])).toEqual([]);
  });
});
