/**
 * Concurrency benchmark (prints, not a test): the built app on a fresh SQLite file, then
 *   (a) 50 submissions at once from 10 entrants (5 inspected drafts each), and
 *   (b) 20 entry uploads (G-code + 2 photos) at once beside 200 reads (standings, seasons, entry views).
 * Prints successes, errors by status and p50/p95 latency per phase, and the inspection rows left
 * queued or running afterwards. Target: 0 server errors (5xx) in both phases.
 *
 *   npx next build && npx tsx scripts/bench-concurrency.ts
 * BENCH_SETTLE_S (default 600): how long to wait for the inspections to finish afterwards.
 */
import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';
import { gunzipSync, gzipSync } from 'node:zlib';
import sharp from 'sharp';
import { startServer } from '../tests/support/server';
import { Client } from '../tests/support/client';
import { sql } from '../tests/support/db';
import { freshEntrant } from '../tests/support/demo';

const FIXTURE = path.resolve(__dirname, '..', 'tests', 'fixtures', 'gcode', 'prusa-beacon-020.gcode.gz');
const plain = gunzipSync(fs.readFileSync(FIXTURE));
/** Each upload its own G-code (a comment differs), so no entry is flagged as another's duplicate. */
// A command, not a comment, makes each copy its own: the duplicate check ignores comments.
const uniqueGcode = () => gzipSync(Buffer.concat([plain, Buffer.from(`\nM117 bench ${crypto.randomUUID()}\n`)]));

interface Sample { ms: number; status: number }

function summary(label: string, samples: Sample[]) {
  const ms = samples.map((s) => s.ms).sort((a, b) => a - b);
  const q = (p: number) => ms[Math.min(ms.length - 1, Math.floor(p * ms.length))] ?? NaN;
  const byStatus = new Map<number, number>();
  for (const s of samples) byStatus.set(s.status, (byStatus.get(s.status) ?? 0) + 1);
  const ok = samples.filter((s) => s.status >= 200 && s.status < 300).length;
  const errors = [...byStatus].filter(([st]) => st < 200 || st >= 300).map(([st, n]) => `${st === 0 ? 'network' : st}: ${n}`);
  const server = samples.filter((s) => s.status >= 500 || s.status === 0).length;
  console.log(`${label}: ${samples.length} requests, ${ok} succeeded, errors ${errors.length ? errors.join(', ') : 'none'}; server errors (5xx) ${server}; latency p50 ${q(0.5).toFixed(0)} ms, p95 ${q(0.95).toFixed(0)} ms, max ${ms.at(-1)?.toFixed(0)} ms`);
}

async function timed(fn: () => Promise<Response>): Promise<Sample> {
  const t = performance.now();
  try {
    const res = await fn();
    await res.arrayBuffer();
    return { ms: performance.now() - t, status: res.status };
  } catch {
    return { ms: performance.now() - t, status: 0 };
  }
}

function entryForm(fields: Record<string, string>, photos: Buffer[]) {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  f.append('gcode', new Blob([new Uint8Array(uniqueGcode())]), 'beacon.gcode.gz');
  photos.forEach((p, i) => f.append('photos', new Blob([new Uint8Array(p)]), `photo-${i}.jpg`));
  return f;
}

async function waitInspected(c: Client, ids: number[]) {
  for (const id of ids) {
    for (let i = 0; ; i++) {
      const body = (await (await c.get(`/api/entries/${id}/inspection`)).json()) as { inspection: { status: string } | null };
      if (body.inspection && ['done', 'failed'].includes(body.inspection.status)) break;
      if (i > 2400) throw new Error(`inspection of entry ${id} did not finish`);
      await new Promise((r) => setTimeout(r, 250));
    }
  }
}

async function main() {
  const port = Number(process.env.HOTLAP_TEST_PORT || 3100) + 60;
  const server = await startServer(port);
  const db = server.dbFile;
  try {
    const [season] = await sql<{ id: number; slug: string }>(db, "SELECT id, slug FROM seasons WHERE slug = 'frostbite-sprint'");
    const [cls] = await sql<{ id: number }>(db, "SELECT id FROM classes WHERE season_id = ? AND slug = 'open-04'", [season.id]);
    // Room for 5 drafts per entrant in one class (the demo season allows 3).
    await sql(db, 'UPDATE seasons SET entry_limit = 10 WHERE id = ?', [season.id]);
    const photo = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#5a7d9a' } }).jpeg().toBuffer();

    console.log('Preparing 10 entrants with 5 inspected drafts each…');
    const entrants: { c: Client; machineId: number; drafts: number[] }[] = [];
    for (let i = 0; i < 10; i++) {
      const c = await freshEntrant(server.url, db, `Bench Entrant ${i}`);
      const m = await c.post('/api/entrant/machines', { name: `Bench Rig ${i}`, motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4, hotend: 'Bench hotend', isModified: false });
      entrants.push({ c, machineId: ((await m.json()) as { id: number }).id, drafts: [] });
    }
    const fields = (machineId: number) => ({
      seasonId: String(season.id), classId: String(cls.id), machineId: String(machineId), materialFamily: 'pla', materialName: '', nozzleMm: '0.4',
      claimedTime: '0:25:10.0', evidenceUrl: 'https://video.example.org/bench', notes: '',
    });
    for (const e of entrants) {
      for (let k = 0; k < 5; k++) {
        const res = await e.c.request('/api/entries', { method: 'POST', body: entryForm(fields(e.machineId), [photo, photo]) });
        if (res.status !== 201) throw new Error(`draft: ${res.status} ${await res.text()}`);
        e.drafts.push(((await res.json()) as { id: number }).id);
      }
    }
    for (const e of entrants) await waitInspected(e.c, e.drafts);

    console.log('(a) 50 submissions at once from 10 entrants');
    const a = await Promise.all(entrants.flatMap((e) => e.drafts.map((id) => timed(() => e.c.post(`/api/entries/${id}/submit`, {})))));
    summary('    submit', a);
    const submitted = (await sql<{ n: number }>(db, "SELECT COUNT(*) AS n FROM entries WHERE state = 'submitted' AND entrant_id IN (SELECT entrant_id FROM entries WHERE id IN (" + entrants.flatMap((e) => e.drafts).join(',') + '))'))[0].n;
    console.log(`    entries now submitted: ${submitted} of 50`);

    console.log('(b) 20 uploads beside 200 reads');
    const reader = new Client(server.url);
    const own = entrants[0];
    const readPaths = [
      `/api/v1/seasons/${season.slug}/classes/open-04/standings`,
      '/api/v1/seasons',
      `/seasons/${season.slug}`,
      `/api/entries/${own.drafts[0]}`,
    ];
    const uploads = entrants.flatMap((e) => [0, 1].map(() => timed(() => e.c.request('/api/entries', { method: 'POST', body: entryForm(fields(e.machineId), [photo, photo]) }))));
    const reads = Array.from({ length: 200 }, (_, i) => {
      const p = readPaths[i % readPaths.length];
      return timed(() => (p.startsWith('/api/entries/') ? own.c.get(p) : reader.get(p)));
    });
    const [up, rd] = await Promise.all([Promise.all(uploads), Promise.all(reads)]);
    summary('    upload', up);
    summary('    read  ', rd);

    // Every inspection must finish: none may be left queued or running by a failed write.
    const deadline = Date.now() + 1000 * (Number(process.env.BENCH_SETTLE_S) || 600);
    let left = Infinity;
    while (Date.now() < deadline) {
      left = (await sql<{ n: number }>(db, "SELECT COUNT(*) AS n FROM inspections WHERE status IN ('queued', 'running')"))[0].n;
      if (left === 0) break;
      await new Promise((r) => setTimeout(r, 1000));
    }
    const failed = (await sql<{ n: number }>(db, "SELECT COUNT(*) AS n FROM inspections WHERE status = 'failed'"))[0].n;
    console.log(`inspections left queued or running: ${left}; failed: ${failed}`);
  } finally {
    await server.stop();
  }
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err instanceof Error ? err.stack : err);
    process.exit(1);
  },
);
