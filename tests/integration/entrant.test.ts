import { describe, it, expect, inject, beforeAll } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import http from 'node:http';
import sharp from 'sharp';
import exifr from 'exifr';
import { gunzipSync, gzipSync } from 'node:zlib';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { freshEntrant } from '../support/demo';
import { sqlDate } from '../support/judging-fixtures';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const FIXTURES = path.resolve(__dirname, '..', 'fixtures', 'gcode');
// Made unique per run: other files on the same server upload this fixture for other entrants,
// which the inspection rightly flags as a duplicate G-code.
// Made this run's own with a display-message command: duplicates are matched on the moves, so a comment alone would not do.
const gcode020 = gzipSync(Buffer.concat([gunzipSync(fs.readFileSync(path.join(FIXTURES, 'prusa-beacon-020.gcode.gz'))), Buffer.from(`\nM117 entrant test run ${Date.now()}-${Math.random()}\n`)]));
const gcode028 = fs.readFileSync(path.join(FIXTURES, 'prusa-beacon-028.gcode.gz'));

// Its own account: other test files add entries for the demo entrants on the same server.
let maker: Client & { email: string };
// Another entrant of its own, for the other-entrant checks.
let pim: Client & { email: string };
const anonymous = new Client(base);

async function photo(withGps = true) {
  let img = sharp({ create: { width: 900, height: 600, channels: 3, background: '#159c86' } }).jpeg();
  if (withGps) img = img.withExif({ IFD2: { DateTimeOriginal: '2026:11:28 09:15:00' }, IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '48/1 8/1 0/1', GPSLongitudeRef: 'E', GPSLongitude: '11/1 34/1 0/1' } });
  return img.toBuffer();
}

let seasonId: number;
let leafSeasonId: number;
let openClassId: number;
let leafClassId: number;
let piece: { x: number; y: number; z: number };
let machineId: number;

function details(extra: Record<string, string> = {}) {
  return {
    seasonId: String(seasonId), classId: String(openClassId), machineId: String(machineId), materialFamily: 'pla', materialName: 'Test grey',
    nozzleMm: '0.4', claimedTime: '0:25:10.0', evidenceUrl: 'https://video.example.org/sasha-run',
    measuredXMm: String(piece.x), measuredYMm: String(piece.y), measuredZMm: String(piece.z), notes: '', ...extra,
  };
}

function form(fields: Record<string, string>, files: { field: string; name: string; data: Buffer; type?: string }[]) {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  for (const file of files) f.append(file.field, new Blob([new Uint8Array(file.data)], { type: file.type ?? 'application/octet-stream' }), file.name);
  return f;
}

const postForm = (c: Client, p: string, body: FormData) => c.request(p, { method: 'POST', body });

async function waitForInspection(c: Client, entryId: number) {
  for (let i = 0; i < 240; i++) {
    const r = await c.get(`/api/entries/${entryId}/inspection`);
    const body = await r.json();
    if (body.inspection && ['done', 'failed'].includes(body.inspection.status)) return body;
    await new Promise((res) => setTimeout(res, 250));
  }
  throw new Error('inspection did not finish');
}

const count = async (table: string) => (await sql<{ n: number }>(dbFile, `SELECT COUNT(*) AS n FROM ${table}`))[0].n;

beforeAll(async () => {
  maker = await freshEntrant(base, dbFile, 'Test Maker');
  pim = await freshEntrant(base, dbFile, 'Other Maker');
  const seasons = await sql<{ id: number; slug: string }>(dbFile, 'SELECT id, slug FROM seasons');
  seasonId = seasons.find((s) => s.slug === 'frostbite-sprint')!.id;
  leafSeasonId = seasons.find((s) => s.slug === 'leaf-fall-dash')!.id;
  openClassId = (await sql<{ id: number }>(dbFile, "SELECT id FROM classes WHERE season_id = ? AND slug = 'open-04'", [seasonId]))[0].id;
  leafClassId = (await sql<{ id: number }>(dbFile, "SELECT id FROM classes WHERE season_id = ? AND slug = 'open-04'", [leafSeasonId]))[0].id;
  const tp = (await sql<{ x: number; y: number; z: number }>(dbFile, 'SELECT size_x_mm AS x, size_y_mm AS y, size_z_mm AS z FROM test_pieces WHERE season_id = ?', [seasonId]))[0];
  piece = tp;
});

describe('machines and extrusion-limit tests', () => {
  it('an entrant registers a machine; field errors come back by name', async () => {
    const bad = await maker.post('/api/entrant/machines', { name: '', motionSystem: 'hexapod', buildXMm: 5 });
    expect(bad.status).toBe(400);
    const fields = (await bad.json()).fields;
    expect(Object.keys(fields)).toEqual(expect.arrayContaining(['name', 'motionSystem', 'buildXMm']));
    const res = await maker.post('/api/entrant/machines', { name: 'Test Rig 250', motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4, hotend: 'Test hotend', isModified: false });
    expect(res.status).toBe(201);
    machineId = (await res.json()).id;
  });

  it('records an extrusion-limit test and computes the limit', async () => {
    const res = await maker.post(`/api/entrant/machines/${machineId}/extrusion-tests`, {
      materialFamily: 'pla', filamentDiameterMm: 1.75, sampleLengthMm: 100, referenceMassG: 0.3,
      steps: [{ rateMm3s: 20, massG: 0.3 }, { rateMm3s: 30, massG: 0.297 }, { rateMm3s: 40, massG: 0.29 }],
    });
    expect(res.status).toBe(201);
    const t = await res.json();
    // By hand: 0.297/0.3 = 99 % passes, 0.29/0.3 = 96.7 % fails → limit 30 mm³/s.
    expect(t.limitFlowMm3s).toBe(30);
    const row = await sql<{ limit_flow_mm3s: number }>(dbFile, 'SELECT limit_flow_mm3s FROM extrusion_tests WHERE machine_id = ?', [machineId]);
    expect(row[0].limit_flow_mm3s).toBe(30);
  });

  it("another entrant's machine answers 404 (not 403) for read, change and tests", async () => {
    expect((await pim.get(`/api/entrant/machines/${machineId}`)).status).toBe(404);
    expect((await pim.put(`/api/entrant/machines/${machineId}`, { name: 'Mine now', motionSystem: 'corexy', buildXMm: 200, buildYMm: 200, buildZMm: 200, nozzleMm: 0.4 })).status).toBe(404);
    expect((await pim.request(`/api/entrant/machines/${machineId}`, { method: 'PATCH', json: { retired: true } })).status).toBe(404);
    expect((await pim.get(`/api/entrant/machines/${machineId}/extrusion-tests`)).status).toBe(404);
    expect((await pim.post(`/api/entrant/machines/${machineId}/extrusion-tests`, { materialFamily: 'pla', filamentDiameterMm: 1.75, sampleLengthMm: 100, steps: [{ rateMm3s: 10, massG: 0.3 }] })).status).toBe(404);
    const list = await (await pim.get('/api/entrant/machines')).json();
    expect(list.machines.map((m: { id: number }) => m.id)).not.toContain(machineId);
    expect((await anonymous.get('/api/entrant/machines')).status).toBe(401);
  });
});

describe('uploads are checked before anything is kept', () => {
  it('a PNG renamed to .gcode is refused and nothing is created', async () => {
    const before = [await count('entries'), await count('stored_files')];
    const png = await sharp({ create: { width: 20, height: 20, channels: 3, background: '#000' } }).png().toBuffer();
    const res = await postForm(maker, '/api/entries', form(details(), [{ field: 'gcode', name: 'beacon.gcode', data: png }, { field: 'photos', name: 'a.jpg', data: await photo() }]));
    expect(res.status).toBe(415);
    const body = await res.json();
    expect(body.fields.gcode).toMatch(/is a PNG image, not G-code/);
    expect([await count('entries'), await count('stored_files')]).toEqual(before);
  });

  it('binary G-code is refused with how to export text', async () => {
    const res = await postForm(maker, '/api/entries', form(details(), [{ field: 'gcode', name: 'beacon.bgcode', data: Buffer.concat([Buffer.from('GCDE'), Buffer.alloc(64, 1)]) }]));
    expect(res.status).toBe(415);
    expect((await res.json()).fields.gcode).toMatch(/binary G-code.*plain-text/);
  });

  it('an upload declaring more than the limit is refused with 413 before the body is read', async () => {
    const cookie = (maker as unknown as { cookieHeader(): string }).cookieHeader();
    const status = await new Promise<number>((resolve, reject) => {
      const u = new URL(`${base}/api/entries`);
      const req = http.request({ hostname: u.hostname, port: u.port, path: u.pathname, method: 'POST', headers: { cookie, 'content-type': 'multipart/form-data; boundary=xyz', 'content-length': String(2 * 1024 ** 3) } }, (res) => {
        resolve(res.statusCode ?? 0);
        res.resume();
        req.destroy();
      });
      req.on('error', reject);
      // Only a few bytes of the declared 2 GB are ever sent.
      req.write('--xyz\r\n');
    });
    expect(status).toBe(413);
  });

  it('a photo over the per-file limit is refused with 413', async () => {
    const big = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), Buffer.alloc(21 * 1024 * 1024, 3)]);
    const res = await postForm(maker, '/api/entries', form(details(), [{ field: 'gcode', name: 'beacon.gcode.gz', data: gcode020 }, { field: 'photos', name: 'huge.jpg', data: big }]));
    expect(res.status).toBe(413);
    expect((await res.json()).error).toMatch(/limit/);
  });

  it('an interrupted upload leaves no entry and no stored file', async () => {
    const before = [await count('entries'), await count('stored_files')];
    const cookie = (maker as unknown as { cookieHeader(): string }).cookieHeader();
    const boundary = 'cutoff';
    const head = Object.entries(details()).map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`).join('') +
      `--${boundary}\r\nContent-Disposition: form-data; name="gcode"; filename="beacon.gcode.gz"\r\nContent-Type: application/gzip\r\n\r\n`;
    await new Promise<void>((resolve) => {
      const u = new URL(`${base}/api/entries`);
      const req = http.request({ hostname: u.hostname, port: u.port, path: u.pathname, method: 'POST', headers: { cookie, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(head.length + gcode020.length + 100) } });
      req.on('error', () => resolve());
      req.write(head);
      req.write(gcode020.subarray(0, 20_000));
      setTimeout(() => {
        req.destroy();
        resolve();
      }, 300);
    });
    await new Promise((r) => setTimeout(r, 1000));
    expect([await count('entries'), await count('stored_files')]).toEqual(before);
  });

  it('a season that is not open refuses entries with 409', async () => {
    const res = await postForm(maker, '/api/entries', form(details({ seasonId: String(leafSeasonId), classId: String(leafClassId) }), [{ field: 'gcode', name: 'beacon.gcode.gz', data: gcode020 }]));
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/not open for entries/);
  });

  it('a class the machine is not eligible for is refused with the reason', async () => {
    const wide = (await sql<{ id: number }>(dbFile, "SELECT id FROM classes WHERE season_id = ? AND slug = 'wide-06'", [seasonId]))[0].id;
    const res = await postForm(maker, '/api/entries', form(details({ classId: String(wide) }), [{ field: 'gcode', name: 'beacon.gcode.gz', data: gcode020 }]));
    expect(res.status).toBe(422);
    expect((await res.json()).fields.classId).toMatch(/0\.6 mm or wider/);
  });
});

describe('an entry from upload to submission', () => {
  let entryId: number;
  let gcodeFileId: number;

  it('creates a draft from one upload and inspects it off the request thread', async () => {
    const res = await postForm(maker, '/api/entries', form(details(), [
      { field: 'gcode', name: 'beacon-028.gcode.gz', data: gcode028 },
      { field: 'photos', name: 'front.jpg', data: await photo(), type: 'image/jpeg' },
      { field: 'photos', name: 'window.jpg', data: await photo(), type: 'image/jpeg' },
    ]));
    expect(res.status).toBe(201);
    entryId = (await res.json()).id;
    const { inspection, blockers } = await waitForInspection(maker, entryId);
    expect(inspection.status).toBe('done');
    // prusa-beacon-028 was sliced with 3 walls, 25 % infill, 5 top / 3 bottom layers (tests/fixtures/manifest.json).
    const failing = inspection.ruleResults.filter((r: { status: string }) => r.status === 'fail').map((r: { rule: { metric: string } }) => r.rule.metric);
    expect(failing).toEqual(expect.arrayContaining(['walls', 'infill_percent', 'top_layers', 'bottom_layers']));
    expect(inspection.blockingFailures).toBeGreaterThanOrEqual(4);
    expect(blockers.join(' ')).toMatch(/blocking problem/);
    const row = (await sql<{ status: string; peak_flow_mm3s: number; estimated_time_s: number; layer_height_mm: number }>(dbFile, 'SELECT * FROM inspections WHERE entry_id = ? ORDER BY id DESC', [entryId]))[0];
    expect(row.status).toBe('done');
    expect(row.layer_height_mm).toBeCloseTo(0.28, 3);
    expect(row.peak_flow_mm3s).toBeGreaterThan(0);
  });

  it('blocking failures prevent submitting', async () => {
    const res = await maker.post(`/api/entries/${entryId}/submit`, {});
    expect(res.status).toBe(422);
    expect((await res.json()).error).toMatch(/blocking/);
  });

  it("another entrant cannot see or change the draft or its files (404)", async () => {
    const files = await sql<{ id: number; kind: string }>(dbFile, 'SELECT id, kind FROM stored_files WHERE entry_id = ?', [entryId]);
    expect(files.map((f) => f.kind).sort()).toEqual(['gcode', 'photo', 'photo', 'thumbnail', 'thumbnail']);
    for (const c of [pim, anonymous]) {
      for (const f of files) expect((await c.get(`/api/files/${f.id}`)).status, `file ${f.kind}`).toBe(404);
    }
    expect((await pim.get(`/api/entries/${entryId}`)).status).toBe(404);
    expect((await pim.get(`/api/entries/${entryId}/inspection`)).status).toBe(404);
    expect((await pim.post(`/api/entries/${entryId}/submit`, {})).status).toBe(404);
    expect((await pim.post(`/api/entries/${entryId}/withdraw`, {})).status).toBe(404);
    expect((await postForm(pim, `/api/entries/${entryId}/files`, form({}, [{ field: 'gcode', name: 'x.gcode', data: Buffer.from('G1 X1 E1\n') }]))).status).toBe(404);
    expect((await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [entryId]))[0].state).toBe('draft');
  });

  it('photos are served without location data; the capture time is kept', async () => {
    const view = await (await maker.get(`/api/entries/${entryId}`)).json();
    expect(view.files.photos).toHaveLength(2);
    const p = view.files.photos[0];
    expect(p.capturedAt).toBe('2026-11-28T09:15:00');
    expect(p.locationRemoved).toBe(true);
    for (const url of [p.url, p.thumbnailUrl]) {
      const res = await maker.get(url);
      expect(res.status).toBe(200);
      const bytes = Buffer.from(await res.arrayBuffer());
      // exifr: an independent EXIF reader finds no GPS in what is served.
      expect(await exifr.gps(bytes)).toBeUndefined();
    }
  });

  it('a compliant G-code fixes the blocking failures; the entry submits and mails a confirmation', async () => {
    const res = await postForm(maker, `/api/entries/${entryId}/files`, form({}, [{ field: 'gcode', name: 'beacon-020.gcode.gz', data: gcode020 }]));
    expect(res.status).toBe(200);
    const { inspection, blockers } = await waitForInspection(maker, entryId);
    expect(inspection.fileName).toBe('beacon-020.gcode.gz');
    expect(inspection.blockingFailures).toBe(0);
    expect(blockers).toEqual([]);
    // prusa-beacon-020: PrusaSlicer reports 1427 s; the engine's estimate is near it (within 10 %).
    expect(inspection.figures.estimatedTimeS).toBeGreaterThan(1427 * 0.9);
    expect(inspection.figures.estimatedTimeS).toBeLessThan(1427 * 1.1);
    expect(inspection.flowSeries.maxMm3s.length).toBeGreaterThan(10);
    const sub = await maker.post(`/api/entries/${entryId}/submit`, {});
    expect(sub.status).toBe(200);
    expect((await sub.json()).state).toBe('submitted');
    const mail = await sql<{ subject: string; text: string }>(dbFile, 'SELECT subject, text FROM sent_mails WHERE "to" = ? ORDER BY id DESC LIMIT 1', [maker.email]);
    expect(mail[0].subject).toMatch(new RegExp(`Entry received: Frostbite Sprint .* \\(entry #${entryId}\\)`));
    expect(mail[0].text).toContain(`/me/entries/${entryId}`);
    const audit = await sql<{ action: string }>(dbFile, "SELECT action FROM audit_events WHERE subject_type = 'entry' AND subject_id = ? ORDER BY id", [String(entryId)]);
    expect(audit.map((a) => a.action)).toEqual(['entry.created', 'entry.files_replaced', 'entry.submitted']);
    gcodeFileId = (await sql<{ id: number }>(dbFile, "SELECT id FROM stored_files WHERE entry_id = ? AND kind = 'gcode' ORDER BY id DESC", [entryId]))[0].id;
  });

  it('the same G-code from another entrant is flagged as a duplicate', async () => {
    const pimMachine = await (await pim.post('/api/entrant/machines', { name: 'Pim test rig', motionSystem: 'corexy', buildXMm: 300, buildYMm: 300, buildZMm: 300, nozzleMm: 0.4 })).json();
    const res = await postForm(pim, '/api/entries', form(details({ machineId: String(pimMachine.id) }), [{ field: 'gcode', name: 'copied.gcode.gz', data: gcode020 }]));
    expect(res.status).toBe(201);
    const { inspection } = await waitForInspection(pim, (await res.json()).id);
    expect(inspection.flags.map((f: { code: string }) => f.code)).toContain('duplicate_gcode');
    expect(inspection.blockingFailures).toBeGreaterThan(0);
    // And pim still cannot read the maker's G-code.
    expect((await pim.get(`/api/files/${gcodeFileId}`)).status).toBe(404);
  });

  it('a submitted entry can be withdrawn, with an e-mail', async () => {
    const res = await maker.post(`/api/entries/${entryId}/withdraw`, {});
    expect(res.status).toBe(200);
    expect((await res.json()).state).toBe('withdrawn');
    const mail = await sql<{ subject: string }>(dbFile, 'SELECT subject FROM sent_mails WHERE "to" = ? ORDER BY id DESC LIMIT 1', [maker.email]);
    expect(mail[0].subject).toMatch(/^Entry withdrawn/);
    expect((await maker.post(`/api/entries/${entryId}/submit`, {})).status).toBe(409);
  });
});

describe('a returned entry', () => {
  it('is resubmitted only with new files, re-inspected, and mailed', async () => {
    // Own copy of the compliant G-code with one harmless command of its own (a display message), so it is not a
    // duplicate of another entrant's upload: an added comment alone would still match (duplicates ignore comments).
    const own = Buffer.concat([gunzipSync(gcode020), Buffer.from('\nM117 Maker resubmission copy\n')]);
    const res = await postForm(maker, '/api/entries', form(details(), [
      { field: 'gcode', name: 'beacon.gcode', data: own, type: 'text/plain' },
      { field: 'photos', name: 'front.jpg', data: await photo() },
      { field: 'photos', name: 'side.png', data: await sharp({ create: { width: 300, height: 300, channels: 3, background: '#fff' } }).png().toBuffer() },
    ]));
    expect(res.status).toBe(201);
    const id = (await res.json()).id;
    expect((await waitForInspection(maker, id)).inspection.blockingFailures).toBe(0);
    // Details can change while a draft; a bad time is explained next to its field.
    const bad = await maker.put(`/api/entries/${id}`, details({ claimedTime: 'quick' }));
    expect(bad.status).toBe(400);
    expect((await bad.json()).fields.claimedTime).toMatch(/h:mm:ss\.t/);
    expect((await maker.post(`/api/entries/${id}/submit`, {})).status).toBe(200);
    // A judge returns it (the judging side's act, arranged directly here).
    await sql(dbFile, "UPDATE entries SET state = 'returned', decided_at = ? WHERE id = ?", [sqlDate(new Date(Date.now() + 1000)), id]);
    await new Promise((r) => setTimeout(r, 1500));
    const early = await maker.post(`/api/entries/${id}/submit`, {});
    expect(early.status).toBe(422);
    expect((await early.json()).error).toMatch(/returned: upload the corrected files/);
    const up = await postForm(maker, `/api/entries/${id}/files`, form({}, [{ field: 'photos', name: 'better-1.jpg', data: await photo() }, { field: 'photos', name: 'better-2.jpg', data: await photo(false) }]));
    expect(up.status).toBe(200);
    const view = await (await maker.get(`/api/entries/${id}`)).json();
    expect(view.files.photos.map((p: { name: string }) => p.name)).toEqual(['better-1.jpg', 'better-2.jpg']);
    const again = await maker.post(`/api/entries/${id}/submit`, {});
    expect(again.status).toBe(200);
    const mail = await sql<{ subject: string }>(dbFile, 'SELECT subject FROM sent_mails WHERE "to" = ? ORDER BY id DESC LIMIT 1', [maker.email]);
    expect(mail[0].subject).toMatch(/^Entry resubmitted: Frostbite Sprint/);
    // The replaced photos stay for the judges but are no longer the owner's current set or public.
    const photos = await sql<{ id: number; meta: string }>(dbFile, "SELECT id, meta FROM stored_files WHERE entry_id = ? AND kind = 'photo' ORDER BY id", [id]);
    const replaced = photos.filter((p) => JSON.parse(p.meta).replacedAt != null);
    expect(replaced).toHaveLength(2);
    expect((await anonymous.get(`/api/files/${replaced[0].id}`)).status).toBe(404);
  });
});

describe('crash during inspection', () => {
  it('an inspection left running by a stopped server is taken again by the job queue (no page read needed)', async () => {
    const entry = (await sql<{ id: number }>(dbFile, "SELECT e.id FROM entries e JOIN users u ON u.id = e.entrant_id WHERE u.email = ? AND e.state = 'draft' ORDER BY e.id DESC LIMIT 1", [pim.email]))[0];
    const latest = (await sql<{ id: number; stored_file_id: number }>(dbFile, 'SELECT id, stored_file_id FROM inspections WHERE entry_id = ? ORDER BY id DESC LIMIT 1', [entry.id]))[0];
    // As a server killed mid-inspection leaves it: a row marked running that no process works on.
    await sql(dbFile, "INSERT INTO inspections (entry_id, stored_file_id, engine_version, status, rule_results, flags, blocking_failures, advisory_flags, created_at, updated_at) VALUES (?, ?, 'x', 'running', '[]', '[]', 0, 0, ?, ?)", [entry.id, latest.stored_file_id, sqlDate(), sqlDate()]);
    const { inspection } = await waitForInspection(pim, entry.id);
    expect(inspection.status).toBe('done');
    expect(inspection.id).toBeGreaterThan(latest.id);
  });
});
