/**
 * Hotlap on several machines, on local ports: two web servers (`next start`) and two inspection
 * workers (`npm run worker`'s bundle) on one PostgreSQL database and one storage. An entrant submits
 * on server A, a worker inspects, a judge verifies on server B, and the standings of both servers show
 * the entry. A worker killed with SIGKILL in the middle of a job is replaced by the other: the job runs
 * again to completion, once, and nothing is lost.
 *
 * Runs in the integration run on PostgreSQL (HOTLAP_TEST_DB=postgres, scripts/test-all.sh: the global
 * setup starts a throwaway cluster), or against HOTLAP_TEST_POSTGRES_URL (a server whose user may
 * create databases); skipped otherwise. Storage: the run's (S3 fake with HOTLAP_TEST_STORAGE=s3),
 * else one local folder shared by all four processes.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gunzipSync, gzipSync } from 'node:zlib';
import { randomUUID } from 'node:crypto';
import pg from 'pg';
import sharp from 'sharp';
import { prepareDatabase, spawnApp, testEnv } from '../support/server';
import { Client } from '../support/client';
import { DEMO_PASSWORD, demoEmail } from '../support/demo';
import { FIXTURE_GCODE_DIR } from '../support/judging-fixtures';

/** The PostgreSQL server: the suite's throwaway cluster (HOTLAP_TEST_DB=postgres) or one named by HOTLAP_TEST_POSTGRES_URL. */
const CLUSTER_URL = process.env.HOTLAP_TEST_PG_URL || process.env.HOTLAP_TEST_POSTGRES_URL;
const urlOf = (db: string) => {
  const u = new URL(CLUSTER_URL!);
  u.pathname = `/${db}`;
  return u.toString();
};
const ROOT = path.resolve(__dirname, '..', '..');
const base = Number(process.env.HOTLAP_TEST_PORT || 3100);
const [portA, portB] = [base + 3, base + 4];
const dbName = `hotlap_mm_${process.pid}_${Date.now() % 100000}`;
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-mm-'));
const SEASON = 'frostbite-sprint';
const CLASS = 'open-04';

let dbUrl = '';
let db: pg.Pool;
const children: ChildProcess[] = [];
const workers: { child: ChildProcess; log: string[] }[] = [];

const q = async <T extends pg.QueryResultRow>(text: string, params: unknown[] = []) => (await db.query<T>(text, params)).rows;

function envFor(port: number): Record<string, string> {
  return {
    ...testEnv(port, dataDir),
    DATABASE_URL: dbUrl,
    // Short lease and poll: a killed worker's job is taken back within seconds.
    HOTLAP_JOB_LEASE_MS: '2000',
    HOTLAP_JOB_POLL_MS: '300',
    HOTLAP_INSPECTION_WORKERS: '1',
    // The web servers only enqueue: the workers run every inspection.
    HOTLAP_EMBEDDED_WORKER: '0',
  };
}

function startWorker(): { child: ChildProcess; log: string[] } {
  const bundle = path.join(ROOT, '.hotlap', 'engine', 'worker.cjs');
  if (!fs.existsSync(bundle)) throw new Error('Run `npm run build:engine` first: the worker bundle is missing.');
  const child = spawn(process.execPath, [bundle], {
    cwd: ROOT,
    // Test-only delay: each job waits 3 s after its claim, long enough to kill the worker mid-job.
    env: { ...process.env, ...envFor(portA), NODE_ENV: 'production', HOTLAP_TEST_JOB_DELAY_MS: '3000' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const w = { child, log: [] as string[] };
  const take = (d: Buffer) => w.log.push(...String(d).split('\n').filter(Boolean));
  child.stdout?.on('data', take);
  child.stderr?.on('data', take);
  children.push(child);
  workers.push(w);
  return w;
}

async function until<T>(what: string, read: () => Promise<T> | T, ok: (v: T) => boolean, timeoutMs = 90_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await read();
    if (ok(v)) return v;
    if (Date.now() > deadline) throw new Error(`${what}: still ${JSON.stringify(v)}\nworkers:\n${workers.map((w) => w.log.join('\n')).join('\n---\n')}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

/** A new confirmed entrant, signed in on `server`. */
async function freshEntrant(server: string, name: string) {
  const email = `${name.toLowerCase().replace(/\W+/g, '.')}.${randomUUID().slice(0, 8)}@example.org`;
  const c = new Client(server);
  expect((await c.post('/api/account/signup', { name, email, password: 'fresh-entrant-password' })).status).toBe(202);
  await until('the account', () => q('SELECT id FROM users WHERE email = $1', [email]), (r) => r.length === 1, 10_000);
  await q('UPDATE users SET email_verified_at = now() WHERE email = $1', [email]);
  expect((await c.signIn(email, 'fresh-entrant-password')).status).toBe(200);
  return c;
}

/** Submits an entry with a unique copy of real slicer output; returns its id. */
async function submit(c: Client, label: string): Promise<number> {
  const machine = await c.post('/api/entrant/machines', { name: `${label} rig`, motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4, hotend: 'Test hotend', isModified: false });
  expect(machine.status).toBe(201);
  const [season] = await q<{ id: number }>('SELECT id FROM seasons WHERE slug = $1', [SEASON]);
  const [cls] = await q<{ id: number }>('SELECT id FROM classes WHERE season_id = $1 AND slug = $2', [season.id, CLASS]);
  const [tp] = await q<{ x: number; y: number; z: number }>('SELECT size_x_mm AS x, size_y_mm AS y, size_z_mm AS z FROM test_pieces WHERE season_id = $1', [season.id]);
  const f = new FormData();
  const fields = {
    seasonId: String(season.id), classId: String(cls.id), machineId: String((await machine.json()).id), materialFamily: 'pla', materialName: 'Mill grey',
    nozzleMm: '0.4', claimedTime: '0:25:10.0', evidenceUrl: 'https://video.example.org/multi-machine', measuredXMm: String(tp.x), measuredYMm: String(tp.y), measuredZMm: String(tp.z), notes: '',
  };
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  // Unique bytes by a command line (duplicate detection ignores comments).
  const plain = gunzipSync(fs.readFileSync(path.join(FIXTURE_GCODE_DIR, 'prusa-beacon-020.gcode.gz')));
  f.append('gcode', new Blob([new Uint8Array(gzipSync(Buffer.concat([plain, Buffer.from(`\nM117 test-${randomUUID()}\n`)])))]), `${label}.gcode.gz`);
  const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#2a6f97' } }).jpeg().toBuffer();
  // The demo season asks for two photos.
  for (const name of ['a.jpg', 'b.jpg']) f.append('photos', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), name);
  const res = await c.request('/api/entries', { method: 'POST', body: f });
  expect(res.status, await res.clone().text()).toBe(201);
  return (await res.json()).id;
}

const inspectionsOf = (entryId: number) =>
  q<{ id: number; status: string; attempts: number; error: string | null; has_report: boolean; finished_at: Date | null }>(
    'SELECT id, status, attempts, error, report IS NOT NULL AS has_report, finished_at FROM inspections WHERE entry_id = $1 ORDER BY id',
    [entryId],
  );

/** Whether `entrant`'s entry is ranked in the class standings that `server` answers (a failure is thrown with its body). */
const standingsHas = async (server: string, entrant: string) => {
  const res = await new Client(server).get(`/api/v1/seasons/${SEASON}/classes/${CLASS}/standings?per_page=100`);
  if (!res.ok) throw new Error(`${server} standings: ${res.status} ${await res.text()}`);
  return ((await res.json()) as { rows: { entrant: string }[] }).rows.some((r) => r.entrant === entrant);
};

describe.skipIf(!CLUSTER_URL)('Hotlap on several machines (PostgreSQL, two web servers, two workers)', () => {
  let A = '';
  let B = '';

  beforeAll(async () => {
    dbUrl = urlOf(dbName);
    // On the suite's cluster prepareDatabase creates it (tests/support/server.ts); elsewhere, here.
    if (!dbUrl.startsWith(`${process.env.HOTLAP_TEST_PG_URL}/`)) {
      const admin = new pg.Client({ connectionString: urlOf('postgres') });
      await admin.connect();
      await admin.query(`CREATE DATABASE ${dbName}`);
      await admin.end();
    }
    db = new pg.Pool({ connectionString: dbUrl, max: 2 });
    // An idle connection ended by the database's removal at the end is not an error of the test.
    db.on('error', () => undefined);
    // Migrations and the demo data, once, as an operator runs them before starting the processes.
    prepareDatabase(envFor(portA));
    const [a, b] = await Promise.all([spawnApp(portA, envFor(portA), 'Web server A'), spawnApp(portB, envFor(portB), 'Web server B')]);
    children.push(a, b);
    A = `http://127.0.0.1:${portA}`;
    B = `http://127.0.0.1:${portB}`;
    startWorker();
    startWorker();
    await until('both workers up', () => workers.map((w) => w.log.some((l) => l.includes('inspection jobs from pg-boss'))), (v) => v.every(Boolean), 30_000);
  }, 240_000);

  afterAll(async () => {
    for (const c of children) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
    await db?.end();
    if (CLUSTER_URL) {
      const admin = new pg.Client({ connectionString: urlOf('postgres') });
      await admin.connect();
      await admin.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`).catch(() => undefined);
      await admin.end();
    }
    fs.rmSync(dataDir, { recursive: true, force: true });
  });

  it('submitted on A, inspected by a worker, verified on B: both servers’ standings show the entry', async () => {
    // The processes read their settings back from the running database: it is PostgreSQL, and the workers' pg-boss schema is there.
    expect((await q<{ v: string }>('SELECT version() AS v'))[0].v).toMatch(/^PostgreSQL/);
    const maker = await freshEntrant(A, 'Pia Marsh');
    const entryId = await submit(maker, 'first');
    // The web servers only enqueue: the row is run by one of the workers, whose log names it.
    const [row] = await until('inspection done', () => inspectionsOf(entryId), (r) => r.length === 1 && r[0].status === 'done', 60_000);
    expect(row).toMatchObject({ attempts: 1, error: null, has_report: true });
    // The log line comes just after the write: wait for it.
    // One storage for all four processes: the S3 fake in the run on it (nothing on local disk), else the shared folder.
    expect(fs.existsSync(path.join(dataDir, 'uploads', 'entries', String(entryId)))).toBe(!process.env.HOTLAP_TEST_S3);
    const ranBy = await until('the worker’s log', () => workers.filter((w) => w.log.some((l) => l.endsWith(`inspection ${row.id} attempt 1 ended`))), (r) => r.length > 0, 10_000);
    expect(ranBy).toHaveLength(1);
    // Its pg-boss job(s) all completed; one claim in the workers' logs.
    // (completed just after the worker's "ended" line)
    const jobs = await until('its pg-boss job completed', () => q<{ state: string }>("SELECT state FROM pgboss.job WHERE name = 'inspection' AND data->>'inspectionId' = $1", [String(row.id)]), (j) => j.length > 0 && j.every((x) => x.state === 'completed'), 10_000);
    expect(new Set(jobs.map((j) => j.state))).toEqual(new Set(['completed']));
    expect(workers.flatMap((w) => w.log).filter((l) => l.includes(`inspection ${row.id} attempt`) && l.endsWith('claimed'))).toHaveLength(1);

    // The entrant submits on A once the inspection is in.
    const sub = await maker.post(`/api/entries/${entryId}/submit`, {});
    expect(sub.status, await sub.clone().text()).toBe(200);
    const judge = new Client(B);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    const verified = await judge.post(`/api/judging/entries/${entryId}/decisions`, { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Clean run on the other server.' });
    expect(verified.status, await verified.clone().text()).toBe(201);
    expect((await verified.json()).entryState).toBe('verified');
    const decidedAt = Date.now();
    const seen = await until('standings of A and B', async () => [await standingsHas(A, 'Pia Marsh'), await standingsHas(B, 'Pia Marsh')], (v) => v.every(Boolean), 10_000);
    expect(seen).toEqual([true, true]);
    // Printed, not asserted (no wall-clock assertions in tests): the target is within a second.
    console.log(`multi-machine: entry ${entryId} in the standings of both servers ${Date.now() - decidedAt} ms after the decision on B`);
  });

  it('a worker killed with SIGKILL mid-job is replaced by the other: the job runs again to completion, once', async () => {
    const maker = await freshEntrant(A, 'Odile Fenn');
    const entryId = await submit(maker, 'second');
    const [{ id: inspectionId }] = await until('the inspection row', () => inspectionsOf(entryId), (r) => r.length === 1);
    const claimed = `inspection ${inspectionId} attempt 1 claimed`;
    const victim = (await until('a worker claims the job', () => workers.find((w) => w.log.some((l) => l.endsWith(claimed))), Boolean, 60_000))!;
    const survivor = workers.find((w) => w !== victim)!;
    expect((await inspectionsOf(entryId))[0]).toMatchObject({ status: 'running', attempts: 1 });
    victim.child.kill('SIGKILL');
    await until('the victim gone', () => victim.child.signalCode, (s) => s === 'SIGKILL', 10_000);

    const [row] = await until('inspection done again', () => inspectionsOf(entryId), (r) => r[0]?.status === 'done', 60_000);
    // Taken again by the survivor under a new attempt, and written once, by it.
    expect(row).toMatchObject({ id: inspectionId, attempts: 2, error: null, has_report: true });
    const ended = await until('the survivor’s log', () => survivor.log.filter((l) => l.endsWith(`inspection ${inspectionId} attempt 2 ended`)), (r) => r.length > 0, 10_000);
    expect(ended).toHaveLength(1);
    expect(victim.log.filter((l) => l.includes(`inspection ${inspectionId} attempt 1 ended`))).toHaveLength(0);
    // Nothing duplicated: one inspection row for the entry, one submission in the audit trail.
    expect(await inspectionsOf(entryId)).toHaveLength(1);
    const audit = await q<{ action: string; n: string }>("SELECT action, COUNT(*) AS n FROM audit_events WHERE subject_id = $1 AND action LIKE 'entry.%' GROUP BY action", [String(entryId)]);
    for (const a of audit) expect(Number(a.n), a.action).toBe(1);
    // The pg-boss jobs: the retaken attempt's job completed; the killed worker's job left for pg-boss's expiry (its retry finds the row done and does nothing).
    // (A job sent twice in a race is completed without a claim: the claims in the logs are what ran.)
    const jobs = await until(
      'the retaken job completed',
      () => q<{ key: string; state: string }>("SELECT singleton_key AS key, state FROM pgboss.job WHERE name = 'inspection' AND data->>'inspectionId' = $1 ORDER BY created_on", [String(inspectionId)]),
      (j) => j.filter((x) => x.key.endsWith(':1')).every((x) => x.state === 'completed'),
      10_000,
    );
    expect([...new Set(jobs.map((j) => j.key))]).toEqual([`inspection:${inspectionId}:0`, `inspection:${inspectionId}:1`]);
    expect(new Set(jobs.filter((j) => j.key.endsWith(':1')).map((j) => j.state))).toEqual(new Set(['completed']));
    const claims = workers.flatMap((w) => w.log).filter((l) => l.includes(`inspection ${inspectionId} attempt`) && l.endsWith('claimed'));
    expect(claims.map((l) => l.replace(/^worker \d+: /, '')).sort()).toEqual([`inspection ${inspectionId} attempt 1 claimed`, `inspection ${inspectionId} attempt 2 claimed`]);
    // The rerun's report is the entry's: it submits (on server A).
    const sub = await maker.post(`/api/entries/${entryId}/submit`, {});
    expect(sub.status, await sub.clone().text()).toBe(200);
    expect((await q<{ state: string }>('SELECT state FROM entries WHERE id = $1', [entryId]))[0].state).toBe('submitted');
  });
});
