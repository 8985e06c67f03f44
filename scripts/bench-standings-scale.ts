/**
 * Standings at two scales, side by side: 500 000 entries on PostgreSQL and 50 000 on SQLite (the
 * SQLite data set comes from scripts/bench-standings.ts's generator). Each database gets the demo
 * data, then generated entrants, machines, entries and finished inspections in the demo's open
 * season (60 % in the Open class); the built app (`next start`) is started on it and the standings
 * API is timed, sequential requests, p50 and p95 per view, then the first request after a write
 * (through the change log, and with the log pruned: a full re-rank). Prints; asserts nothing.
 *
 *   npx next build && npx tsx scripts/bench-standings-scale.ts [--pg-entries 500000] [--sqlite-entries 50000] [--requests 100]
 *
 * PostgreSQL: HOTLAP_BENCH_POSTGRES_URL (a server whose user may create databases), else a
 * throwaway cluster from Debian's postgresql (tests/support/postgres.ts). The PostgreSQL rows are made
 * by the server itself (INSERT … SELECT over generate_series, seeded random()), in a few statements.
 * Talks to 127.0.0.1 only.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { execFileSync } from 'node:child_process';
import pg from 'pg';
import sqlite3 from 'sqlite3';
import { arg, generate, quantile, startApp, type Generated } from './bench-standings';
import { testEnv } from '../tests/support/server';
import { startCluster, type Cluster } from '../tests/support/postgres';
import { STANDINGS_CHANGES_KEPT } from '../migrations/20261204-r01-standings-changes';

const ROOT = path.resolve(__dirname, '..');
const VIEWS = ['', '?page=40', '?sort=-peak_flow', '?material=petg&motion=corexy', '?q=heron'];

/** Demo data on a new PostgreSQL database, then `entries` generated entries (one entrant per ten). */
export async function generatePostgres(clusterUrl: string, entries: number, port: number): Promise<Generated & { url: string }> {
  const t0 = Date.now();
  const name = `hotlap_bench_${Date.now().toString(36)}`;
  const at = (db: string) => Object.assign(new URL(clusterUrl), { pathname: `/${db}` }).toString();
  const admin = new pg.Client({ connectionString: at('postgres') });
  await admin.connect();
  await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  const url = at(name);
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-bench-pg-'));
  const env = { ...testEnv(port, dataDir), DATABASE_URL: url };
  execFileSync(process.execPath, [path.join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), 'scripts/seed.ts'], { cwd: ROOT, env: { ...process.env, ...env }, stdio: 'pipe' });
  const db = new pg.Client({ connectionString: url });
  await db.connect();
  const one = async <T extends pg.QueryResultRow>(sql: string, params: unknown[] = []) => (await db.query<T>(sql, params)).rows[0];
  const season = await one<{ id: number }>("SELECT id FROM seasons WHERE slug = 'frostbite-sprint'");
  const classes = (await db.query<{ id: number; slug: string }>('SELECT id, slug FROM classes WHERE season_id = $1 ORDER BY display_order', [season.id])).rows;
  const entrants = Math.max(1, Math.round(entries / 10));
  const { u } = await one<{ u: number }>('SELECT MAX(id) AS u FROM users');
  const { m } = await one<{ m: number }>('SELECT MAX(id) AS m FROM machines');
  const { e } = await one<{ e: number }>('SELECT COALESCE(MAX(id), 0) AS e FROM entries');
  await db.query('BEGIN');
  // Bulk load: the per-row triggers (the standings change counter) and foreign-key checks off for
  // this transaction where the user may (superuser: a throwaway cluster); the counter is bumped once after.
  const [{ su }] = (await db.query<{ su: boolean }>('SELECT rolsuper AS su FROM pg_roles WHERE rolname = current_user')).rows;
  if (su) await db.query("SET LOCAL session_replication_role = 'replica'");
  // Seeded, so every run builds the same data set.
  await db.query('SELECT setseed(0.20261201)');
  await db.query(
    `INSERT INTO users (id, email, name, password_hash, roles, created_at, updated_at)
     SELECT $1::int + g, 'bench.' || g || '@example.org', 'Bench Entrant ' || g, 'x', '["entrant"]', now(), now() FROM generate_series(1, $2::int) g`,
    [u, entrants],
  );
  await db.query(
    `INSERT INTO machines (id, owner_id, name, motion_system, build_x_mm, build_y_mm, build_z_mm, nozzle_mm, created_at, updated_at)
     SELECT $1::int + g, $2::int + g,
       (ARRAY['Kestrel','Anvil','Heron','Spire','Wren','Comet','Lathe','Quarry','Tern','Harbor','Ridge','Pylon'])[1 + g % 12] || ' ' || (100 + g % 900),
       (ARRAY['corexy','corexy','cartesian','delta','other'])[1 + floor(random() * 5)::int], 250, 250, 250, 0.4, now(), now()
     FROM generate_series(1, $3::int) g`,
    [m, u, entrants],
  );
  // Times around 25 min with a long tail; flows that loosely buy speed; 80 % verified (as the SQLite generator).
  await db.query(
    `INSERT INTO entries (id, season_id, class_id, entrant_id, machine_id, material_family, nozzle_mm, claimed_time_ms, state, submitted_at, decided_at, created_at, updated_at)
     SELECT $1::int + g, $2::int, CASE WHEN r < 0.6 THEN $4::int WHEN r < 0.8 THEN $3::int ELSE $5::int END, $6::int + w, $7::int + w,
       (ARRAY['pla','pla','pla','petg','petg','abs','asa','tpu','pa','pc'])[1 + floor(random() * 10)::int], 0.4, t,
       st, sub, CASE WHEN st = 'submitted' THEN NULL ELSE sub + interval '1 day' END, now(), now()
     FROM (
       SELECT g, random() AS r, 1 + floor(random() * $8::int)::int AS w,
         round(1200000 + random() * 900000 + CASE WHEN random() < 0.1 THEN random() * 1200000 ELSE 0 END)::int AS t,
         (ARRAY['verified','verified','verified','verified','verified','verified','verified','verified','submitted','rejected'])[1 + floor(random() * 10)::int] AS st,
         timestamptz '2026-11-15 12:00:00+00' + random() * interval '16 days' AS sub
       FROM generate_series(1, $9::int) g
     ) x`,
    [e, season.id, classes[0].id, classes[1].id, classes[2].id, u, m, entrants, entries],
  );
  await db.query(
    `INSERT INTO inspections (entry_id, engine_version, status, report, peak_flow_mm3s, p95_flow_mm3s, layer_height_mm, estimated_time_s, finished_at, created_at, updated_at)
     SELECT id, 'bench', 'done',
       jsonb_build_object('layers', jsonb_build_object('count', 160, 'height_mm', 0.25, 'first_height_mm', 0.3),
                          'flow', jsonb_build_object('peak_mm3s', peak, 'p95_mm3s', round((peak * 0.8)::numeric, 1)::float8),
                          'time', jsonb_build_object('estimated_s', claimed_time_ms / 1000.0 - 30)),
       peak, round((peak * 0.8)::numeric, 1)::float8, 0.25, claimed_time_ms / 1000.0 - 30, now(), now(), now()
     FROM (SELECT id, claimed_time_ms, round((45 - (claimed_time_ms - 1200000) / 60000.0 + random() * 12)::numeric, 1)::float8 AS peak FROM entries WHERE id > $1::int) x`,
    [e],
  );
  for (const t of ['users', 'machines', 'entries']) await db.query(`SELECT setval(pg_get_serial_sequence('${t}', 'id'), (SELECT MAX(id) FROM ${t}))`);
  await db.query('COMMIT');
  // One write through the triggers, so the standings change counter moves past the bulk load.
  await db.query('UPDATE entries SET updated_at = now() WHERE id = (SELECT MAX(id) FROM entries)');
  await db.query('ANALYZE');
  const counts = (await db.query<{ slug: string; n: string }>('SELECT c.slug, COUNT(*) AS n FROM entries e JOIN classes c ON c.id = e.class_id WHERE e.id > $1 GROUP BY c.slug ORDER BY c.slug', [e])).rows;
  await db.end();
  console.log(`PostgreSQL: generated ${entries} entries (${entrants} entrants) in ${((Date.now() - t0) / 1000).toFixed(1)} s: ${counts.map((c) => `${c.slug} ${c.n}`).join(', ')}`);
  return { url, dataDir, dbFile: url, env, season: 'frostbite-sprint', classes: counts.map((c) => ({ slug: c.slug, entries: Number(c.n) })) };
}

interface Row {
  db: string;
  entries: number;
  view: string;
  p50: number;
  p95: number;
  total: number;
}

/** Runs one statement on the generated database (plain SQL, no parameters). */
async function exec(gen: Generated, sql: string): Promise<void> {
  if (/^postgres/.test(gen.dbFile)) {
    const c = new pg.Client({ connectionString: gen.dbFile });
    await c.connect();
    await c.query(sql);
    await c.end();
    return;
  }
  const db = new sqlite3.Database(gen.dbFile);
  db.configure('busyTimeout', 5000);
  await new Promise<void>((ok, fail) => db.run(sql, (e) => (e ? fail(e) : ok())));
  await new Promise<void>((ok) => db.close(() => ok()));
}

/**
 * A write that moves a rank in the measured class: the claimed time of the i-th verified entry
 * (spread over the class) set to a new value, as a judge's or organizer's change would.
 */
async function moveRank(gen: Generated, i: number): Promise<void> {
  const offset = (i * 7919) % 2000;
  const timeMs = 1_150_000 + ((i * 104_729) % 1_000_000);
  await exec(
    gen,
    `UPDATE entries SET claimed_time_ms = ${timeMs} WHERE id = (SELECT e.id FROM entries e JOIN classes c ON c.id = e.class_id
       WHERE c.slug = 'open-04' AND e.state = 'verified' ORDER BY e.id LIMIT 1 OFFSET ${offset})`,
  );
}

/**
 * Times `requests` sequential GETs of each view (after 10 warm-up requests each); then the first
 * request after a write that moves a rank (20 times: the kept ranking is brought forward from the
 * change log), and after the same write with the counter pushed past what the log keeps (5 times:
 * the fallback, a full re-rank of the class).
 */
async function measure(label: string, entries: number, gen: Generated, port: number, requests: number): Promise<Row[]> {
  const server = await startApp(gen, port);
  const rows: Row[] = [];
  try {
    const base = `${server.url}/api/v1/seasons/${gen.season}/classes/open-04/standings`;
    for (const v of VIEWS) {
      for (let i = 0; i < 10; i++) await (await fetch(base + v)).arrayBuffer();
      const times: number[] = [];
      let total = 0;
      for (let i = 0; i < requests; i++) {
        const t = performance.now();
        const res = await fetch(base + v);
        const body = (await res.json()) as { total: number };
        times.push(performance.now() - t);
        if (!res.ok) throw new Error(`${label} ${v}: HTTP ${res.status} ${JSON.stringify(body)}`);
        total = body.total;
      }
      rows.push({ db: label, entries, view: v || '(default: rank, page 1)', p50: quantile(times, 0.5), p95: quantile(times, 0.95), total });
    }
    const afterWrite = async (n: number, first: number, before?: () => Promise<void>) => {
      const times: number[] = [];
      for (let i = 0; i < n; i++) {
        await moveRank(gen, first + i);
        await before?.();
        const t = performance.now();
        await (await fetch(base)).arrayBuffer();
        times.push(performance.now() - t);
      }
      return times;
    };
    const incremental = await afterWrite(20, 1);
    rows.push({ db: label, entries, view: 'after a write (change log)', p50: quantile(incremental, 0.5), p95: quantile(incremental, 0.95), total: rows[0]?.total ?? 0 });
    const full = await afterWrite(5, 100, () => exec(gen, `UPDATE standings_version SET version = version + ${STANDINGS_CHANGES_KEPT + 1} WHERE id = 1`));
    rows.push({ db: label, entries, view: 'after a write, log pruned (full)', p50: quantile(full, 0.5), p95: quantile(full, 0.95), total: rows[0]?.total ?? 0 });
  } finally {
    await server.stop();
  }
  return rows;
}

async function main() {
  const pgEntries = arg('pg-entries', 500_000);
  const sqliteEntries = arg('sqlite-entries', 50_000);
  const requests = arg('requests', 100);
  const port = Number(process.env.HOTLAP_TEST_PORT || 3100) + 5;
  let cluster: Cluster | undefined;
  const clusterUrl = process.env.HOTLAP_BENCH_POSTGRES_URL || (cluster = startCluster(Number(process.env.HOTLAP_BENCH_PG_PORT || port + 2400))).url;
  const rows: Row[] = [];
  const load = () => os.loadavg().map((l) => l.toFixed(2)).join(' ');
  console.log(`load average at start: ${load()}`);
  try {
    const pgGen = await generatePostgres(clusterUrl, pgEntries, port);
    rows.push(...(await measure('PostgreSQL', pgEntries, pgGen, port, requests)));
    fs.rmSync(pgGen.dataDir, { recursive: true, force: true });
    const admin = new pg.Client({ connectionString: Object.assign(new URL(clusterUrl), { pathname: '/postgres' }).toString() });
    await admin.connect();
    await admin.query(`DROP DATABASE IF EXISTS ${new URL(pgGen.url).pathname.slice(1)} WITH (FORCE)`);
    await admin.end();
    const sqliteGen = await generate(sqliteEntries, port);
    rows.push(...(await measure('SQLite', sqliteEntries, sqliteGen, port, requests)));
    fs.rmSync(sqliteGen.dataDir, { recursive: true, force: true });
  } finally {
    cluster?.stop();
  }
  console.log(`\nload average at the end: ${load()} (${os.cpus().length} cores)`);
  console.log(`Standings API (open-04), ${requests} sequential requests per view after 10 warm-up requests, 127.0.0.1:`);
  console.log('database'.padEnd(12) + 'entries'.padStart(9) + '  ' + 'view'.padEnd(32) + 'p50 ms'.padStart(8) + 'p95 ms'.padStart(8) + 'ranked'.padStart(8));
  for (const r of rows) console.log(r.db.padEnd(12) + String(r.entries).padStart(9) + '  ' + r.view.padEnd(32) + r.p50.toFixed(1).padStart(8) + r.p95.toFixed(1).padStart(8) + String(r.total).padStart(8));
}

// Run only as a script (the generator is imported by other tools).
if (process.argv[1] && path.resolve(process.argv[1]) === __filename) main().then(
  () => process.exit(0),
  (err) => {
    console.error(err instanceof Error ? err.stack : err);
    process.exit(1);
  },
);
