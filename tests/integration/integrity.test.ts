/**
 * Integrity of entries and decisions against a running server: every state is checked where it is
 * written (races reproduced with a slow upload body), verification only of what the entrant
 * submitted, frozen standings keep their entries, the season's entry window, real dates, photos
 * that decode and plain-digit ids.
 */
import { dataDirOf } from '../support/server';
import { describe, it, expect, inject, beforeAll } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import http from 'node:http';
import crypto from 'node:crypto';
import sharp from 'sharp';
import { gunzipSync, gzipSync } from 'node:zlib';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { createReviewableEntry, FIXTURE_GCODE_DIR, seasonId as seasonIdOf, sqlDate } from '../support/judging-fixtures';
import { listTestFiles } from '../support/storage';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const dataDir = dataDirOf(dbFile);

/** A G-code that passes the demo season's blocking rules, made unique (the duplicate check). */
// A command, not a comment, makes each copy unique: the duplicate check ignores comments.
const passingGcode = () =>
  gzipSync(Buffer.concat([gunzipSync(fs.readFileSync(path.join(FIXTURE_GCODE_DIR, 'prusa-beacon-020.gcode.gz'))), Buffer.from(`\nM117 integrity test ${crypto.randomUUID()}\n`)]));
const failingGcode = fs.readFileSync(path.join(FIXTURE_GCODE_DIR, 'prusa-beacon-028.gcode.gz'));

const photo = () => sharp({ create: { width: 400, height: 300, channels: 3, background: '#2a6f97' } }).jpeg().toBuffer();
const verify = { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Clean run, timing matches the video.' };
const giveBack = { decision: 'return', reasonCodes: ['timing_unconfirmed'], note: 'The video stops before the last layer; add the full video.' };

let maker: Client & { email: string };
let judge: Client;
let frostId: number;
let openClassId: number;
let machineId: number;

function form(fields: Record<string, string>, files: { field: string; name: string; data: Buffer }[]) {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  for (const file of files) f.append(file.field, new Blob([new Uint8Array(file.data)]), file.name);
  return f;
}

function details(extra: Record<string, string> = {}) {
  return {
    seasonId: String(frostId), classId: String(openClassId), machineId: String(machineId), materialFamily: 'pla', materialName: 'Test grey',
    nozzleMm: '0.4', claimedTime: '0:25:10.0', evidenceUrl: 'https://video.example.org/integrity-run', notes: '', ...extra,
  };
}

async function waitForInspection(c: Client, entryId: number) {
  for (let i = 0; i < 480; i++) {
    const body = await (await c.get(`/api/entries/${entryId}/inspection`)).json();
    if (body.inspection && ['done', 'failed'].includes(body.inspection.status)) return body;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error('inspection did not finish');
}

/** A draft with a passing G-code and the two photos the demo season asks for, inspected. */
async function readyDraft(c: Client = maker, extra: Record<string, string> = {}) {
  const res = await c.request('/api/entries', {
    method: 'POST',
    body: form(details(extra), [
      { field: 'gcode', name: 'beacon.gcode.gz', data: passingGcode() },
      { field: 'photos', name: 'front.jpg', data: await photo() },
      { field: 'photos', name: 'side.jpg', data: await photo() },
    ]),
  });
  expect(res.status, await res.clone().text()).toBe(201);
  const { id } = await res.json();
  const { inspection, blockers } = await waitForInspection(c, id);
  expect(inspection.blockingFailures).toBe(0);
  expect(blockers).toEqual([]);
  return id as number;
}

const stateOf = async (id: number) => (await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [id]))[0].state;
const storedKeys = async (id: number) => (await sql<{ storage_key: string }>(dbFile, 'SELECT storage_key FROM stored_files WHERE entry_id = ?', [id])).map((r) => r.storage_key).sort();
/** The entry's objects in storage (local disk or the S3 fake, whichever the server uses). */
const storedObjects = (id: number) => listTestFiles(dataDir, `entries/${id}/`);

/**
 * Starts a multipart upload whose body arrives slowly: the head and part of the file now, the rest
 * when `finish()` is called. Resolves `response` with the status and body once the server answers.
 */
function slowUpload(c: Client, urlPath: string, field: string, name: string, data: Buffer) {
  const boundary = `----hotlap${crypto.randomBytes(8).toString('hex')}`;
  const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${field}"; filename="${name}"\r\nContent-Type: application/octet-stream\r\n\r\n`);
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
  const url = new URL(c.base + urlPath);
  const cookie = (c as unknown as { cookieHeader(): string }).cookieHeader();
  let resolve!: (r: { status: number; body: string }) => void;
  const response = new Promise<{ status: number; body: string }>((r) => (resolve = r));
  const req = http.request({
    host: url.hostname, port: url.port, path: url.pathname, method: 'POST',
    headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': head.length + data.length + tail.length, cookie, 'x-forwarded-for': c.ip },
  }, (res) => {
    let body = '';
    res.on('data', (d) => (body += d));
    res.on('end', () => resolve({ status: res.statusCode!, body }));
  });
  const half = Math.floor(data.length / 2);
  req.write(head);
  req.write(data.subarray(0, half));
  return {
    response,
    finish() {
      req.write(data.subarray(half));
      req.end(tail);
      return response;
    },
  };
}

beforeAll(async () => {
  maker = await freshEntrant(base, dbFile, 'Integrity Maker');
  judge = new Client(base);
  expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
  frostId = await seasonIdOf(dbFile, 'frostbite-sprint');
  openClassId = (await sql<{ id: number }>(dbFile, "SELECT id FROM classes WHERE season_id = ? AND slug = 'open-04'", [frostId]))[0].id;
  // The entry limit is per entrant and class; this file makes more entries than one class allows.
  await sql(dbFile, 'UPDATE seasons SET entry_limit = 50 WHERE id = ?', [frostId]);
  const m = await maker.post('/api/entrant/machines', { name: 'Integrity Rig', motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4, hotend: 'Test hotend', isModified: false });
  expect(m.status).toBe(201);
  machineId = (await m.json()).id;
});

describe('state is checked where it is written', () => {
  it('a replacement upload that finishes after verification is refused and the verified file stays', async () => {
    const id = await readyDraft();
    const keysBefore = await storedKeys(id);
    const gcodeBefore = (await sql<{ id: number }>(dbFile, "SELECT id FROM stored_files WHERE entry_id = ? AND kind = 'gcode'", [id])).map((r) => r.id);
    // The replacement starts while the entry is a draft (so it passes the check before streaming)…
    const upload = slowUpload(maker, `/api/entries/${id}/files`, 'gcode', 'swapped.gcode.gz', gzipSync(Buffer.from(`G28\nG1 X10 Y10 E5 F3000\n; swap ${crypto.randomUUID()}\n`.repeat(4000))));
    await new Promise((r) => setTimeout(r, 300));
    // …meanwhile the entrant submits and a judge verifies…
    expect((await maker.post(`/api/entries/${id}/submit`, {})).status).toBe(200);
    const decided = await judge.post(`/api/judging/entries/${id}/decisions`, verify);
    expect(decided.status, await decided.clone().text()).toBe(201);
    expect(await stateOf(id)).toBe('verified');
    // …then the upload finishes: refused with a sentence, and nothing of it is kept.
    const res = await upload.finish();
    expect(res.status).toBe(409);
    expect(JSON.parse(res.body).error).toMatch(/draft or returned; it is verified now, so nothing was changed/);
    expect(await stateOf(id)).toBe('verified');
    const gcodeAfter = (await sql<{ id: number; meta: string }>(dbFile, "SELECT id, meta FROM stored_files WHERE entry_id = ? AND kind = 'gcode'", [id]));
    expect(gcodeAfter.map((r) => r.id)).toEqual(gcodeBefore);
    expect(JSON.parse(gcodeAfter[0].meta).replacedAt).toBeUndefined();
    expect(await storedKeys(id)).toEqual(keysBefore);
    // The streamed file was not left in storage.
    expect(await storedObjects(id)).toEqual(keysBefore);
  });

  it('details cannot change after submission: 409 with a sentence, nothing changed', async () => {
    const id = await readyDraft();
    expect((await maker.post(`/api/entries/${id}/submit`, {})).status).toBe(200);
    const res = await maker.put(`/api/entries/${id}`, details({ claimedTime: '0:20:00.0' }));
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/Details can be changed while the entry is a draft or returned; it is submitted now/);
    const [row] = await sql<{ claimed_time_ms: number }>(dbFile, 'SELECT claimed_time_ms FROM entries WHERE id = ?', [id]);
    expect(row.claimed_time_ms).toBe(1_510_000);
  });

  it('submitting twice at once submits once', async () => {
    const id = await readyDraft();
    const [a, b] = await Promise.all([maker.post(`/api/entries/${id}/submit`, {}), maker.post(`/api/entries/${id}/submit`, {})]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const audits = await sql(dbFile, "SELECT id FROM audit_events WHERE subject_type = 'entry' AND subject_id = ? AND action = 'entry.submitted'", [String(id)]);
    expect(audits).toHaveLength(1);
  });

  it('submitting records the inspection the entrant submitted', async () => {
    const id = await readyDraft();
    expect((await maker.post(`/api/entries/${id}/submit`, {})).status).toBe(200);
    const [row] = await sql<{ submitted_inspection_id: number; latest: number }>(dbFile, 'SELECT submitted_inspection_id, (SELECT MAX(id) FROM inspections WHERE entry_id = entries.id) AS latest FROM entries WHERE id = ?', [id]);
    expect(row.submitted_inspection_id).toBe(row.latest);
  });
});

describe('verification only of what was submitted', () => {
  it('a judge cannot verify a returned entry; it must be resubmitted first', async () => {
    const { entryId } = await createReviewableEntry(dbFile, { entrant: 'pim', machine: 'Harrier 300' });
    expect((await judge.post(`/api/judging/entries/${entryId}/decisions`, giveBack)).status).toBe(201);
    expect(await stateOf(entryId)).toBe('returned');
    const res = await judge.post(`/api/judging/entries/${entryId}/decisions`, { ...verify, expectedState: 'returned' });
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/Only a submitted entry can be verified.*returned entry comes back to the desk when its entrant submits it again/);
    expect(await stateOf(entryId)).toBe('returned');
  });

  it('a judge cannot verify an entry whose current inspection is not the one submitted (new blocking failures)', async () => {
    const { entryId, inspectionId } = await createReviewableEntry(dbFile, { entrant: 'pim', machine: 'Harrier 300' });
    await sql(dbFile, 'UPDATE entries SET submitted_inspection_id = ? WHERE id = ?', [inspectionId, entryId]);
    // A newer inspection (as a re-inspection would write) finds blocking failures.
    const now = sqlDate();
    await sql(dbFile, "INSERT INTO inspections (entry_id, stored_file_id, engine_version, status, report, rule_results, flags, blocking_failures, advisory_flags, created_at, updated_at, finished_at) SELECT entry_id, stored_file_id, engine_version, 'done', report, '[]', '[]', 2, 0, ?, ?, ? FROM inspections WHERE id = ?", [now, now, now, inspectionId]);
    const res = await judge.post(`/api/judging/entries/${entryId}/decisions`, verify);
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/current inspection is not the one its entrant submitted/);
    expect(await stateOf(entryId)).toBe('submitted');
    // Returning it still works: the entrant gets it back to fix.
    expect((await judge.post(`/api/judging/entries/${entryId}/decisions`, giveBack)).status).toBe(201);
  });
});

describe('frozen standings keep their entries', () => {
  it('a verified entry of a final season cannot be withdrawn (409 with a sentence)', async () => {
    const entrant = new Client(base);
    expect((await entrant.signIn(demoEmail('entrant'), DEMO_PASSWORD)).status).toBe(200);
    const leaf = await seasonIdOf(dbFile, 'leaf-fall-dash');
    const [row] = await sql<{ id: number }>(dbFile, "SELECT e.id FROM entries e JOIN users u ON u.id = e.entrant_id WHERE e.season_id = ? AND e.state = 'verified' AND u.email = ?", [leaf, demoEmail('entrant')]);
    const res = await entrant.post(`/api/entries/${row.id}/withdraw`, {});
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/standings of Leaf-fall Dash are final: a verified entry stays in them/);
    expect(await stateOf(row.id)).toBe('verified');
    const view = await (await entrant.get(`/api/entries/${row.id}`)).json();
    expect(view.canWithdraw).toBe(false);
  });
});

describe('the entry window, dates, photos and ids', () => {
  it('a season opened before its published start date takes no entries until then, and says when', async () => {
    const future = new Date(Date.now() + 10 * 86_400_000);
    await sql(dbFile, 'UPDATE seasons SET opens_at = ? WHERE id = ?', [sqlDate(future), frostId]);
    try {
      const res = await maker.request('/api/entries', { method: 'POST', body: form(details(), [{ field: 'gcode', name: 'beacon.gcode.gz', data: passingGcode() }]) });
      expect(res.status).toBe(409);
      expect((await res.json()).error).toMatch(/Frostbite Sprint takes entries from .* until .*; come back when it opens/);
    } finally {
      await sql(dbFile, 'UPDATE seasons SET opens_at = ? WHERE id = ?', [sqlDate(new Date('2026-11-15T00:00:00Z')), frostId]);
    }
  });

  it('after the closing date no entry is submitted, with a sentence giving the date', async () => {
    const id = await readyDraft();
    const [{ closes_at }] = await sql<{ closes_at: string }>(dbFile, 'SELECT closes_at FROM seasons WHERE id = ?', [frostId]);
    await sql(dbFile, 'UPDATE seasons SET closes_at = ? WHERE id = ?', [sqlDate(new Date(Date.now() - 60_000)), frostId]);
    try {
      const res = await maker.post(`/api/entries/${id}/submit`, {});
      expect(res.status).toBe(409);
      expect((await res.json()).error).toMatch(/took entries until .*; the entry window has closed/);
      expect(await stateOf(id)).toBe('draft');
    } finally {
      await sql(dbFile, 'UPDATE seasons SET closes_at = ? WHERE id = ?', [closes_at, frostId]);
    }
  });

  it('an impossible date (2026-13-45T99:99) is refused, not rolled over', async () => {
    const organizer = new Client(base);
    expect((await organizer.signIn(demoEmail('organizer'), DEMO_PASSWORD)).status).toBe(200);
    const res = await organizer.post('/api/organizer/seasons', {
      name: 'Impossible Dates Cup', slug: `impossible-${Date.now()}`, hostName: 'Test club', description: '', opensAt: '2026-13-45T99:99', closesAt: '2027-02-30T10:00',
      timeZone: 'UTC', timingConvention: 'First extrusion to last extrusion', photosRequired: 1, photoKinds: [], videoRequired: false, entryLimit: 2, verificationsRequired: 1,
    });
    expect(res.status).toBe(400);
    const { fields } = await res.json();
    expect(fields.opensAt).toMatch(/not a real date and time/);
    expect(fields.closesAt).toMatch(/not a real date and time/);
  });

  it('a HEIC header followed by junk is refused as a photo with a sentence, and nothing is stored', async () => {
    const before = (await sql<{ n: number }>(dbFile, 'SELECT COUNT(*) AS n FROM entries'))[0].n;
    const ftyp = Buffer.concat([Buffer.from([0, 0, 0, 24]), Buffer.from('ftypheic', 'latin1'), Buffer.from([0, 0, 0, 0]), Buffer.from('mif1heic', 'latin1')]);
    const junk = Buffer.concat([ftyp, crypto.randomBytes(4096)]);
    const res = await maker.request('/api/entries', {
      method: 'POST',
      body: form(details(), [{ field: 'gcode', name: 'beacon.gcode.gz', data: passingGcode() }, { field: 'photos', name: 'phone.heic', data: junk }]),
    });
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.fields.photos).toMatch(/could not be decoded as a HEIC photo.*export it as JPEG/);
    expect((await sql<{ n: number }>(dbFile, 'SELECT COUNT(*) AS n FROM entries'))[0].n).toBe(before);
  });

  it('ids are plain positive whole numbers: 1e1, 0x7, " 7", 07 and +7 resolve to nothing', async () => {
    const id = await readyDraft();
    expect((await maker.get(`/api/entries/${id}`)).status).toBe(200);
    const lenient = [`0${id}`, `+${id}`, `%20${id}`, `${id}.0`, `0x${id.toString(16)}`, `${id / 10}e1`];
    for (const text of lenient) {
      const res = await maker.get(`/api/entries/${text}`);
      expect([400, 404], `GET /api/entries/${text}`).toContain(res.status);
      expect((await maker.post(`/api/entries/${text}/withdraw`, {})).status, `withdraw ${text}`).not.toBe(200);
    }
    // In bodies too: a season id written as 1e1 is refused.
    const res = await maker.request('/api/entries', { method: 'POST', body: form(details({ seasonId: `${frostId}.0` }), [{ field: 'gcode', name: 'beacon.gcode.gz', data: passingGcode() }]) });
    expect(res.status).toBe(400);
    expect((await res.json()).fields.seasonId).toMatch(/Choose a season/);
    expect(await stateOf(id)).toBe('draft');
  });
});

describe('the draft is no dead end', () => {
  it('a draft missing its evidence link is fixed by editing its details, then submits', async () => {
    const id = await readyDraft();
    // The link was left out: the server refuses to save it empty where the season asks for a video.
    const empty = await maker.put(`/api/entries/${id}`, details({ evidenceUrl: '' }));
    expect(empty.status).toBe(422);
    expect((await empty.json()).fields.evidenceUrl).toMatch(/asks for a link to the video/);
    const fixed = await maker.put(`/api/entries/${id}`, details({ evidenceUrl: 'https://video.example.org/fixed-run', claimedTime: '0:25:12.0' }));
    expect(fixed.status).toBe(200);
    const { blockers } = await waitForInspection(maker, id);
    expect(blockers).toEqual([]);
    expect((await maker.post(`/api/entries/${id}/submit`, {})).status).toBe(200);
  });

  it('a new entry without the evidence link the season asks for is refused next to the field', async () => {
    const res = await maker.request('/api/entries', { method: 'POST', body: form(details({ evidenceUrl: '' }), [{ field: 'gcode', name: 'beacon.gcode.gz', data: passingGcode() }]) });
    expect(res.status).toBe(422);
    expect((await res.json()).fields.evidenceUrl).toMatch(/asks for a link to the video/);
  });
});

describe('blocking failures still block', () => {
  it('an entry whose G-code fails blocking rules cannot be submitted', async () => {
    const res = await maker.request('/api/entries', { method: 'POST', body: form(details(), [{ field: 'gcode', name: 'b28.gcode.gz', data: failingGcode }]) });
    expect(res.status).toBe(201);
    const { id } = await res.json();
    await waitForInspection(maker, id);
    expect((await maker.post(`/api/entries/${id}/submit`, {})).status).toBe(422);
  });
});
