/**
 * The job pipeline through the HTTP API of the running server: asking for re-inspection again and
 * again keeps one queued inspection per entry and, past the per-entrant limit, answers 429 with a
 * sentence; the season's public check-rules route serves each class's effective rules.
 */
import { describe, it, expect, inject, beforeAll } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import { gunzipSync, gzipSync } from 'node:zlib';
import sharp from 'sharp';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { freshEntrant } from '../support/demo';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const FIXTURE = path.resolve(__dirname, '..', 'fixtures', 'gcode', 'prusa-beacon-020.gcode.gz');
let maker: Client & { email: string };
let entryId: number;

beforeAll(async () => {
  maker = await freshEntrant(base, dbFile, 'Queue Tester');
  const machine = await maker.post('/api/entrant/machines', { name: 'Queue Rig', motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4, hotend: 'Test hotend', isModified: false });
  expect(machine.status).toBe(201);
  const [season] = await sql<{ id: number }>(dbFile, "SELECT id FROM seasons WHERE slug = 'frostbite-sprint'");
  const [cls] = await sql<{ id: number }>(dbFile, "SELECT id FROM classes WHERE season_id = ? AND slug = 'open-04'", [season.id]);
  const [tp] = await sql<{ x: number; y: number; z: number }>(dbFile, 'SELECT size_x_mm AS x, size_y_mm AS y, size_z_mm AS z FROM test_pieces WHERE season_id = ?', [season.id]);
  const f = new FormData();
  const fields = {
    seasonId: String(season.id), classId: String(cls.id), machineId: String((await machine.json()).id), materialFamily: 'pla', materialName: 'Queue grey',
    nozzleMm: '0.4', claimedTime: '0:25:10.0', evidenceUrl: 'https://video.example.org/queue-run', measuredXMm: String(tp.x), measuredYMm: String(tp.y), measuredZMm: String(tp.z), notes: '',
  };
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  // Unique bytes: the same fixture uploaded by other entrants is flagged as a duplicate.
  const gcode = gzipSync(Buffer.concat([gunzipSync(fs.readFileSync(FIXTURE)), Buffer.from(`\n; queue test ${Date.now()}\n`)]));
  f.append('gcode', new Blob([new Uint8Array(gcode)]), 'queue.gcode.gz');
  const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#159c86' } }).jpeg().toBuffer();
  f.append('photos', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'a.jpg');
  const res = await maker.request('/api/entries', { method: 'POST', body: f });
  expect(res.status).toBe(201);
  entryId = (await res.json()).id;
}, 120_000);

describe('re-inspection through the API', () => {
  it('keeps one queued inspection per entry and answers 429 with a sentence past the per-entrant limit', async () => {
    const statuses: number[] = [];
    let last: { error?: string } = {};
    // The server's default: 6 re-inspections per entrant per 10 minutes (lib/jobs/settings.ts).
    for (let i = 0; i < 8; i++) {
      const res = await maker.post(`/api/entries/${entryId}/inspect`, {});
      statuses.push(res.status);
      last = await res.json();
      const queued = await sql<{ n: number }>(dbFile, "SELECT COUNT(*) AS n FROM inspections WHERE entry_id = ? AND status = 'queued'", [entryId]);
      expect(queued[0].n).toBeLessThanOrEqual(1);
    }
    expect(statuses).toEqual([200, 200, 200, 200, 200, 200, 429, 429]);
    expect(last.error).toMatch(/^You asked for 6 re-inspections in the last 10 minutes, the most we run for one entrant; try again in \d+ minutes?\.$/);
    // The refused requests left no audit event and no row behind.
    const events = await sql<{ n: number }>(dbFile, "SELECT COUNT(*) AS n FROM audit_events WHERE action = 'entry.reinspected' AND subject_id = ?", [String(entryId)]);
    expect(events[0].n).toBe(6);
  });
});

describe('the public rules for the browser check', () => {
  it('serves each class its effective rules in the engine shape, and 404 for a draft or unknown season', async () => {
    const anonymous = new Client(base);
    const res = await anonymous.get('/api/v1/seasons/frostbite-sprint/check-rules');
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.season.slug).toBe('frostbite-sprint');
    expect(body.ruleContext.testPieceSizeMm.z).toBeGreaterThan(0);
    expect(body.classes.length).toBeGreaterThan(0);
    const stored = await sql<{ n: number }>(dbFile, "SELECT COUNT(*) AS n FROM rules r JOIN seasons s ON s.id = r.season_id WHERE s.slug = 'frostbite-sprint' AND r.class_id IS NULL");
    expect(body.seasonRules).toHaveLength(stored[0].n);
    for (const c of body.classes) for (const r of c.rules) expect(Object.keys(r)).toEqual(expect.arrayContaining(['id', 'metric', 'comparator', 'value', 'severity']));
    expect((await anonymous.get('/api/v1/seasons/no-such-season/check-rules')).status).toBe(404);
  });
});
