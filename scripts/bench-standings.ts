/**
 * Standings at scale: generates N entries (default 50 000) with finished inspections in a fresh
 * SQLite file, prints the query plan of the ranking, then starts the built app on that file and
 * measures the standings API page latency (median, p95) for several views.
 *
 *   npx next build && npx tsx scripts/bench-standings.ts [--entries 50000] [--requests 200] [--keep]
 *
 * Needs a build in NEXT_DIST_DIR (default .next). Talks to 127.0.0.1 only.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import sqlite3 from 'sqlite3';
import { testEnv, waitForServer } from '../tests/support/server';
import { mulberry32 } from '../tests/support/prng';

const ROOT = path.resolve(__dirname, '..');

export function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? Number(process.argv[i + 1]) : fallback;
}

const MATERIALS = ['pla', 'pla', 'pla', 'petg', 'petg', 'abs', 'asa', 'tpu', 'pa', 'pc'];
const MOTIONS = ['corexy', 'corexy', 'cartesian', 'delta', 'other'];
const WORDS = ['Kestrel', 'Anvil', 'Heron', 'Spire', 'Wren', 'Comet', 'Lathe', 'Quarry', 'Tern', 'Harbor', 'Ridge', 'Pylon'];
const STATES = ['verified', 'verified', 'verified', 'verified', 'verified', 'verified', 'verified', 'verified', 'submitted', 'rejected'];

const stamp = (ms: number) => new Date(ms).toISOString().replace('T', ' ').replace('Z', ' +00:00');

function run(db: sqlite3.Database, sql: string, params: unknown[] = []): Promise<void> {
  return new Promise((ok, fail) => db.run(sql, params, (e) => (e ? fail(e) : ok())));
}
function all<T>(db: sqlite3.Database, sql: string, params: unknown[] = []): Promise<T[]> {
  return new Promise((ok, fail) => db.all(sql, params, (e, rows) => (e ? fail(e) : ok(rows as T[]))));
}

export interface Generated {
  dataDir: string;
  dbFile: string;
  env: Record<string, string>;
  season: string;
  classes: { slug: string; entries: number }[];
}

/**
 * Migrates and seeds a fresh database, then adds `entries` entries to the demo's open season:
 * one entrant per ten entries, each with one machine, 60 % of entries in the Open class.
 */
export async function generate(entries: number, port: number, log = console.log): Promise<Generated> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-bench-'));
  const env = { ...testEnv(port, dataDir) };
  const t0 = Date.now();
  execFileSync(process.execPath, [path.join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), 'scripts/seed.ts'], { cwd: ROOT, env: { ...process.env, ...env }, stdio: 'pipe' });
  const dbFile = path.join(dataDir, 'hotlap.sqlite');
  const db = new sqlite3.Database(dbFile);
  await run(db, 'PRAGMA journal_mode = WAL');
  const [season] = await all<{ id: number }>(db, "SELECT id FROM seasons WHERE slug = 'frostbite-sprint'");
  const classes = await all<{ id: number; slug: string }>(db, 'SELECT id, slug FROM classes WHERE season_id = ? ORDER BY display_order', [season.id]);
  // Seeded, so every run builds the same data set.
  const rand = mulberry32(20261201);
  const now = stamp(Date.now());
  const entrants = Math.max(1, Math.round(entries / 10));
  await run(db, 'BEGIN');
  const userIds: number[] = [];
  const machineIds: number[] = [];
  const [{ maxUser }] = await all<{ maxUser: number }>(db, 'SELECT MAX(id) AS maxUser FROM users');
  const [{ maxMachine }] = await all<{ maxMachine: number }>(db, 'SELECT MAX(id) AS maxMachine FROM machines');
  const userStmt = db.prepare('INSERT INTO users (id, email, name, password_hash, roles, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?)');
  const machineStmt = db.prepare('INSERT INTO machines (id, owner_id, name, motion_system, build_x_mm, build_y_mm, build_z_mm, nozzle_mm, created_at, updated_at) VALUES (?, ?, ?, ?, 250, 250, 250, 0.4, ?, ?)');
  for (let i = 0; i < entrants; i++) {
    const uid = maxUser + 1 + i;
    const mid = maxMachine + 1 + i;
    userIds.push(uid);
    machineIds.push(mid);
    userStmt.run(uid, `bench.${i}@example.org`, `Bench Entrant ${i}`, 'x', '["entrant"]', now, now);
    machineStmt.run(mid, uid, `${WORDS[i % WORDS.length]} ${100 + (i % 900)}`, MOTIONS[Math.floor(rand() * MOTIONS.length)], now, now);
  }
  await new Promise<void>((ok) => userStmt.finalize(() => machineStmt.finalize(() => ok())));
  const [{ maxEntry }] = await all<{ maxEntry: number }>(db, 'SELECT COALESCE(MAX(id), 0) AS maxEntry FROM entries');
  const entryStmt = db.prepare(
    'INSERT INTO entries (id, season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, submitted_at, decided_at, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, 0.4, ?, ?, ?, ?, ?, ?)',
  );
  const inspStmt = db.prepare(
    "INSERT INTO inspections (entry_id, engine_version, status, report, peak_flow_mm3s, p95_flow_mm3s, layer_height_mm, estimated_time_s, finished_at, created_at, updated_at) VALUES (?, 'bench', 'done', ?, ?, ?, ?, ?, ?, ?, ?)",
  );
  const seasonStart = Date.parse('2026-11-15T12:00:00Z');
  const counts = new Map<string, number>();
  for (let i = 0; i < entries; i++) {
    const who = Math.floor(rand() * entrants);
    const r = rand();
    const cls = classes[r < 0.6 ? 1 : r < 0.8 ? 0 : 2];
    counts.set(cls.slug, (counts.get(cls.slug) ?? 0) + 1);
    // Times around 25 min with a long tail; flows that loosely buy speed.
    const timeMs = Math.round(1_200_000 + rand() * 900_000 + (rand() < 0.1 ? rand() * 1_200_000 : 0));
    const peak = Math.round((45 - (timeMs - 1_200_000) / 60_000 + rand() * 12) * 10) / 10;
    const submitted = seasonStart + Math.floor(rand() * 16 * 86_400_000);
    const state = STATES[Math.floor(rand() * STATES.length)];
    const id = maxEntry + 1 + i;
    entryStmt.run(id, season.id, cls.id, userIds[who], machineIds[who], MATERIALS[Math.floor(rand() * MATERIALS.length)], timeMs, state, stamp(submitted), state === 'submitted' ? null : stamp(submitted + 86_400_000), now, now);
    const report = JSON.stringify({ layers: { count: 160, height_mm: 0.25, first_height_mm: 0.3 }, flow: { peak_mm3s: peak, p95_mm3s: Math.round(peak * 8) / 10 }, time: { estimated_s: timeMs / 1000 - 30 } });
    inspStmt.run(id, report, peak, Math.round(peak * 8) / 10, 0.25, timeMs / 1000 - 30, now, now, now);
  }
  await new Promise<void>((ok) => entryStmt.finalize(() => inspStmt.finalize(() => ok())));
  await run(db, 'COMMIT');
  await run(db, 'ANALYZE');
  await new Promise<void>((ok) => db.close(() => ok()));
  log(`Generated ${entries} entries (${entrants} entrants) in ${((Date.now() - t0) / 1000).toFixed(1)} s: ${[...counts].map(([k, v]) => `${k} ${v}`).join(', ')}`);
  return { dataDir, dbFile, env, season: 'frostbite-sprint', classes: classes.map((c) => ({ slug: c.slug, entries: counts.get(c.slug) ?? 0 })) };
}

export async function queryPlan(dbFile: string, env: Record<string, string>): Promise<string[]> {
  Object.assign(process.env, env);
  const { explainLiveRanking } = await import('../lib/standings/query');
  const db = new sqlite3.Database(dbFile);
  const [c] = await all<{ season_id: number; id: number }>(db, "SELECT c.season_id, c.id FROM classes c JOIN seasons s ON s.id = c.season_id WHERE s.slug = 'frostbite-sprint' AND c.slug = 'open-04'");
  db.close();
  return explainLiveRanking(c.season_id, c.id);
}

export interface Server {
  url: string;
  /** The server process's id (for reading its CPU time). */
  pid: number;
  stop(): Promise<void>;
}

/** `next start` on the generated database; `nodeFlags` (--cpu-prof…) go before the script, as NODE_OPTIONS refuses some. */
export async function startApp(gen: Generated, port: number, nodeFlags: string[] = []): Promise<Server> {
  if (!fs.existsSync(path.join(ROOT, process.env.NEXT_DIST_DIR || '.next', 'BUILD_ID'))) throw new Error('Run `next build` first (NEXT_DIST_DIR selects the build folder).');
  const child: ChildProcess = spawn(process.execPath, [...nodeFlags, path.join(ROOT, 'node_modules', 'next', 'dist', 'bin', 'next'), 'start', '-p', String(port), '-H', '127.0.0.1'], {
    cwd: ROOT,
    env: { ...process.env, ...gen.env, NODE_ENV: 'production' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const url = `http://127.0.0.1:${port}`;
  await waitForServer(child, `${url}/api/v1/seasons`, 'The app');
  return {
    url,
    pid: child.pid ?? 0,
    async stop() {
      // Waits for the exit (up to 5 s), so that files the server writes on the way out (CPU profiles) are complete.
      const exited = new Promise((ok) => child.once('exit', ok));
      child.kill('SIGTERM');
      await Promise.race([exited, new Promise((ok) => setTimeout(ok, 5000))]);
    },
  };
}

export const quantile = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
};

async function main() {
  const entries = arg('entries', 50_000);
  const requests = arg('requests', 200);
  const port = Number(process.env.HOTLAP_TEST_PORT || 3100) + 50;
  const gen = await generate(entries, port);
  console.log('Query plan of the live ranking (open-04):');
  for (const line of await queryPlan(gen.dbFile, gen.env)) console.log(`  ${line}`);
  // The same call the route makes, in this process: what the library costs without HTTP and Next.js.
  const { classStandings } = await import('../lib/standings/views');
  const { DEFAULT_QUERY } = await import('../lib/standings/params');
  const lib: number[] = [];
  for (let i = 0; i < requests + 10; i++) {
    const t = performance.now();
    await classStandings(gen.season, 'open-04', DEFAULT_QUERY);
    if (i >= 10) lib.push(performance.now() - t);
  }
  console.log(`\nIn-process classStandings() (cached ranking), ${requests} calls: median ${quantile(lib, 0.5).toFixed(2)} ms, p95 ${quantile(lib, 0.95).toFixed(2)} ms`);
  const server = await startApp(gen, port);
  try {
    const base = `${server.url}/api/v1/seasons/${gen.season}/classes/open-04/standings`;
    const views = ['', '?page=40', '?sort=-peak_flow', '?material=petg&motion=corexy', '?q=heron', '?per_page=100&sort=date'];
    console.log(`\nStandings API, ${requests} sequential requests per view (after 10 warm-up requests):`);
    console.log('view'.padEnd(34) + 'median ms'.padStart(10) + 'p95 ms'.padStart(9) + 'rows'.padStart(7) + 'ranked'.padStart(8));
    for (const v of views) {
      for (let i = 0; i < 10; i++) await (await fetch(base + v)).arrayBuffer();
      const times: number[] = [];
      let body: { rows: unknown[]; total: number } = { rows: [], total: 0 };
      for (let i = 0; i < requests; i++) {
        const t = performance.now();
        const res = await fetch(base + v);
        body = await res.json();
        times.push(performance.now() - t);
        if (!res.ok) throw new Error(`${v}: HTTP ${res.status}`);
      }
      console.log((v || '(default: rank, page 1, 25 rows)').padEnd(34) + quantile(times, 0.5).toFixed(1).padStart(10) + quantile(times, 0.95).toFixed(1).padStart(9) + String(body.rows.length).padStart(7) + String(body.total).padStart(8));
    }
    // A write anywhere bumps the change counter: the next request re-ranks the class in SQL.
    const db = new sqlite3.Database(gen.dbFile);
    db.configure('busyTimeout', 5000);
    const cold: number[] = [];
    for (let i = 0; i < 20; i++) {
      await run(db, "UPDATE entries SET updated_at = updated_at WHERE id = (SELECT MIN(id) FROM entries WHERE state = 'verified')");
      const t = performance.now();
      await (await fetch(base)).arrayBuffer();
      cold.push(performance.now() - t);
    }
    await new Promise<void>((ok) => db.close(() => ok()));
    console.log('after a write (re-rank, cache miss)'.padEnd(34) + quantile(cold, 0.5).toFixed(1).padStart(10) + quantile(cold, 0.95).toFixed(1).padStart(9));
  } finally {
    await server.stop();
    if (!process.argv.includes('--keep')) fs.rmSync(gen.dataDir, { recursive: true, force: true });
    else console.log(`Kept ${gen.dataDir}`);
  }
}

if (require.main === module) {
  main().then(
    () => process.exit(0),
    (err) => {
      console.error(err instanceof Error ? err.stack : err);
      process.exit(1);
    },
  );
}
