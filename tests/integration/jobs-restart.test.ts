/**
 * The job pipeline across a server's death: a server killed (SIGKILL) in the middle of its queue
 * leaves its jobs in the inspections table and no process behind it; the next server resumes the
 * queued jobs and the one whose lease passed at start — nobody opens a page — and clears the
 * temporary upload folders the dead one left.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { execFileSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gunzipSync, gzipSync } from 'node:zlib';
import { prepareDatabase, spawnApp, testDb, testEnv } from '../support/server';
import { sql } from '../support/db';
import { FIXTURE_GCODE_DIR } from '../support/judging-fixtures';
import { putTestFile } from '../support/storage';

// Its own server on its own port (the suite's shared server keeps running beside it).
const port = Number(process.env.HOTLAP_TEST_PORT || 3100) + 60;
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-restart-'));
const env = { ...testEnv(port, dataDir), HOTLAP_JOB_LEASE_MS: '2000', HOTLAP_JOB_POLL_MS: '300', HOTLAP_INSPECTION_WORKERS: '1' };
const dbFile = testDb(testEnv(port, dataDir));
const JOBS = 6;
let jobIds: number[] = [];
let server: ChildProcess | null = null;

const startServer = () => spawnApp(port, env, 'The restart test server');

/** Every process descending from `pid` (children, their children, …). */
function descendants(pid: number): number[] {
  const rows = execFileSync('ps', ['-eo', 'pid=,ppid='], { encoding: 'utf8' })
    .trim()
    .split('\n')
    .map((l) => l.trim().split(/\s+/).map(Number));
  const out: number[] = [];
  const walk = (p: number) => {
    for (const [c, pp] of rows) if (pp === p) out.push(c), walk(c);
  };
  walk(pid);
  return out;
}
const alive = (pid: number) => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};
const statuses = async () => sql<{ id: number; status: string; attempts: number; error: string | null; report: string | null }>(dbFile, `SELECT id, status, attempts, error, report FROM inspections WHERE id IN (${jobIds.join(',')}) ORDER BY id`);

async function until<T>(what: string, read: () => Promise<T>, ok: (v: T) => boolean, timeoutMs = 120_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await read();
    if (ok(v)) return v;
    if (Date.now() > deadline) throw new Error(`${what}: still ${JSON.stringify(v)}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

beforeAll(async () => {
  prepareDatabase(env);
  // Six queued inspections of real slicer output for demo entries of several entrants, arranged in
  // the database as an upload leaves them (stored file + queued row).
  const entries = await sql<{ id: number; entrant_id: number }>(dbFile, "SELECT id, entrant_id FROM entries WHERE state != 'withdrawn' ORDER BY id LIMIT ?", [JOBS]);
  expect(entries).toHaveLength(JOBS);
  const plain = gunzipSync(fs.readFileSync(path.join(FIXTURE_GCODE_DIR, 'prusa-beacon-020.gcode.gz')));
  const t = '2026-11-20 10:00:00.000 +00:00';
  for (const [k, e] of entries.entries()) {
    const key = `entries/${e.id}/restart-${k}.gcode.gz`;
    const bytes = gzipSync(Buffer.concat([plain, Buffer.from(`\n; restart test ${k}\n`)]));
    await putTestFile(dataDir, key, bytes);
    await sql(dbFile, "INSERT INTO stored_files (owner_id, entry_id, kind, original_name, mime, size_bytes, sha256, storage_key, meta, created_at, updated_at) VALUES (?, ?, 'gcode', ?, 'application/gzip', ?, ?, ?, '{}', ?, ?)", [
      e.entrant_id, e.id, `run-${k}.gcode.gz`, bytes.length, `restart${k}`.padEnd(64, '0'), key, t, t,
    ]);
    const [{ id: fileId }] = await sql<{ id: number }>(dbFile, 'SELECT MAX(id) AS id FROM stored_files');
    await sql(dbFile, "UPDATE inspections SET status = 'failed' WHERE entry_id = ? AND status = 'queued'", [e.id]);
    await sql(dbFile, "INSERT INTO inspections (entry_id, stored_file_id, engine_version, status, created_at, updated_at) VALUES (?, ?, 'test', 'queued', ?, ?)", [e.id, fileId, t, t]);
    const [{ id }] = await sql<{ id: number }>(dbFile, 'SELECT MAX(id) AS id FROM inspections');
    jobIds.push(id);
  }
}, 180_000);

afterAll(async () => {
  if (server && server.exitCode === null) server.kill('SIGKILL');
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('job pipeline across a killed server', () => {
  it('a killed server leaves no process behind; the next one resumes every job at start and clears stale upload folders', async () => {
    server = await startServer();
    const pid = server.pid!;
    // The first server takes jobs as soon as it starts: catch it with one running and others waiting.
    const mid = await until('a job running mid-queue', statuses, (rows) => rows.some((r) => r.status === 'running') && rows.some((r) => r.status === 'queued'));
    const killedJob = mid.find((r) => r.status === 'running')!.id;
    // Inspections run on threads of the server process, not in processes of their own: nothing to orphan.
    const before = descendants(pid);
    expect(before).toEqual([]);
    server.kill('SIGKILL');
    await until('the server gone', async () => alive(pid), (a) => !a, 10_000);
    expect(before.filter(alive)).toEqual([]);
    const left = await statuses();
    expect(left.filter((r) => r.status === 'queued').length).toBeGreaterThan(0);
    expect(left.find((r) => r.id === killedJob)!.status).toBe('running');

    // A temporary upload folder a dead server left behind.
    const stale = path.join(dataDir, 'tmp', 'uploads', 'upload-stale');
    fs.mkdirSync(stale, { recursive: true });
    fs.writeFileSync(path.join(stale, 'half.gcode'), 'G1 X1\n');

    server = await startServer();
    expect(fs.existsSync(stale)).toBe(false);
    // No page is opened: the server resumes on its own.
    const done = await until('every job done', statuses, (rows) => rows.every((r) => r.status === 'done' || r.status === 'failed'));
    expect(done.map((r) => [r.status, r.error])).toEqual(jobIds.map(() => ['done', null]));
    for (const r of done) expect(JSON.parse(r.report!).layers.count).toBe(200);
    // The job the dead server held was taken again once its lease passed: a second attempt.
    expect(done.find((r) => r.id === killedJob)!.attempts).toBe(2);
    expect(done.filter((r) => r.id !== killedJob).every((r) => r.attempts === 1)).toBe(true);
  }, 240_000);
});
