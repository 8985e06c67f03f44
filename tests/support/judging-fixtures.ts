/**
 * Arranges review-desk data directly in a test server's SQLite file: submitted entries with a real
 * slicer G-code, its inspection (the engine's own report) and photos. Used by the judging
 * integration and browser tests so they do not depend on the submission pages.
 */
import { dataDirOf } from './server';
import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';
import sharp from 'sharp';
import { sql } from './db';
import { demoEmail } from './demo';
import { inspectFile, toJsonReport } from '@/lib/inspection';
import { RuleSchema, type Rule } from '@/lib/inspection/rules';
import type { Flag } from '@/lib/inspection/types';
import { putTestFile } from './storage';

export const FIXTURE_GCODE_DIR = path.resolve(__dirname, '..', 'fixtures', 'gcode');

/** Sequelize's SQLite date format. */
export const sqlDate = (d = new Date()) => d.toISOString().replace('T', ' ').replace('Z', ' +00:00');

export async function idOf(dbFile: string, table: string, where: string, params: unknown[]): Promise<number> {
  const rows = await sql<{ id: number }>(dbFile, `SELECT id FROM ${table} WHERE ${where}`, params);
  if (!rows.length) throw new Error(`no ${table} row where ${where} ${JSON.stringify(params)}`);
  return rows[0].id;
}

export async function userId(dbFile: string, key: string) {
  return idOf(dbFile, 'users', 'email = ?', [demoEmail(key)]);
}

export async function seasonId(dbFile: string, slug: string) {
  return idOf(dbFile, 'seasons', 'slug = ?', [slug]);
}

async function insert(dbFile: string, table: string, row: Record<string, unknown>): Promise<number> {
  const keys = Object.keys(row);
  await sql(dbFile, `INSERT INTO ${table} (${keys.map((k) => `"${k}"`).join(', ')}) VALUES (${keys.map(() => '?').join(', ')})`, keys.map((k) => row[k]));
  return (await sql<{ id: number }>(dbFile, `SELECT MAX(id) AS id FROM ${table}`))[0].id;
}

/** A submitted entry in a demo season (by slug), class and machine of the given demo entrant. */
export async function createSubmittedEntry(
  dbFile: string,
  opts: { season?: string; classSlug?: string; entrant?: string; machine?: string; claimedTimeMs?: number; submittedAt?: Date; evidenceUrl?: string; measuredMm?: [number, number, number] } = {},
): Promise<number> {
  const sId = await seasonId(dbFile, opts.season ?? 'frostbite-sprint');
  const cId = await idOf(dbFile, 'classes', 'season_id = ? AND slug = ?', [sId, opts.classSlug ?? 'open-04']);
  const uId = await userId(dbFile, opts.entrant ?? 'sasha');
  const mId = await idOf(dbFile, 'machines', 'owner_id = ? AND name = ?', [uId, opts.machine ?? 'Tripod Nine']);
  const now = sqlDate();
  // Default: the entrant measured the season's test piece a little off, as calipers do.
  const [piece] = await sql<{ size_x_mm: number; size_y_mm: number; size_z_mm: number }>(dbFile, 'SELECT size_x_mm, size_y_mm, size_z_mm FROM test_pieces WHERE season_id = ?', [sId]);
  const [x, y, z] = opts.measuredMm ?? (piece ? [piece.size_x_mm + 0.08, piece.size_y_mm - 0.05, piece.size_z_mm + 0.02] : [null, null, null]);
  return insert(dbFile, 'entries', {
    season_id: sId, class_id: cId, entrant_id: uId, machine_id: mId, material_family: 'pla', material_name: 'Club grey PLA', nozzle_mm: 0.4,
    claimed_time_ms: opts.claimedTimeMs ?? 1_650_000, evidence_url: opts.evidenceUrl ?? 'https://video.example.org/run-test',
    measured_x_mm: x, measured_y_mm: y, measured_z_mm: z, notes: '', state: 'submitted', gcode_sha256: null,
    submitted_at: sqlDate(opts.submittedAt ?? new Date()), decided_at: null, created_at: now, updated_at: now,
  });
}

/**
 * Stores a fixture G-code as the entry's upload and inserts the engine's inspection of it, with
 * the season's rules and the entry's claims, as the submission flow does. Returns the inspection id.
 */
export async function inspectEntryWithFixture(dbFile: string, entryId: number, fixture = 'prusa-beacon-020.gcode.gz', opts: { engineVersion?: string; claimedTimeMs?: number } = {}): Promise<number> {
  const dataDir = dataDirOf(dbFile);
  const src = path.join(FIXTURE_GCODE_DIR, fixture);
  const bytes = fs.readFileSync(src);
  const sha = crypto.createHash('sha256').update(bytes).digest('hex');
  const key = `entries/${entryId}/gcode-${sha.slice(0, 16)}-${Date.now()}.gcode.gz`;
  await putTestFile(dataDir, key, bytes);
  const [entry] = await sql<{ season_id: number; entrant_id: number; claimed_time_ms: number; measured_x_mm: number | null; measured_y_mm: number | null; measured_z_mm: number | null }>(
    dbFile, 'SELECT season_id, entrant_id, claimed_time_ms, measured_x_mm, measured_y_mm, measured_z_mm FROM entries WHERE id = ?', [entryId]);
  const [piece] = await sql<{ size_x_mm: number; size_y_mm: number; size_z_mm: number }>(dbFile, 'SELECT size_x_mm, size_y_mm, size_z_mm FROM test_pieces WHERE season_id = ?', [entry.season_id]);
  const testPieceSizeMm = piece ? { x: piece.size_x_mm, y: piece.size_y_mm, z: piece.size_z_mm } : undefined;
  const measuredDimensionsMm = entry.measured_x_mm !== null && entry.measured_y_mm !== null && entry.measured_z_mm !== null ? { x: entry.measured_x_mm, y: entry.measured_y_mm, z: entry.measured_z_mm } : undefined;
  const now = sqlDate();
  const fileId = await insert(dbFile, 'stored_files', {
    owner_id: entry.entrant_id, entry_id: entryId, kind: 'gcode', original_name: fixture, mime: 'application/gzip', size_bytes: bytes.length,
    sha256: sha, storage_key: key, meta: '{}', created_at: now, updated_at: now,
  });
  const ruleRows = await sql<{ metric: string; comparator: string; value: number; value_max: number | null; tolerance: number; severity: string }>(
    dbFile, 'SELECT metric, comparator, value, value_max, tolerance, severity FROM rules WHERE season_id = ? AND class_id IS NULL ORDER BY position', [entry.season_id]);
  const rules: Rule[] = ruleRows.map((r) => RuleSchema.parse({ metric: r.metric, comparator: r.comparator, value: r.value, ...(r.value_max !== null ? { valueMax: r.value_max } : {}), tolerance: r.tolerance, severity: r.severity }));
  const report = await inspectFile(src, {
    rules,
    ruleContext: testPieceSizeMm ? { testPieceSizeMm } : {},
    claims: { claimedTimeMs: opts.claimedTimeMs ?? entry.claimed_time_ms, machineFlowLimitMm3s: 30, ...(testPieceSizeMm ? { testPieceSizeMm } : {}), ...(measuredDimensionsMm ? { measuredDimensionsMm } : {}) },
    preview: true,
  });
  const json = toJsonReport(report);
  const ruleResults = json.rules ?? [];
  const flags: Flag[] = [...(report.plausibility ?? []), ...report.warnings];
  const blocking = ruleResults.filter((r) => r.status === 'fail' && r.rule.severity === 'blocking').length + flags.filter((f) => f.severity === 'blocking').length;
  const advisory = ruleResults.filter((r) => r.status === 'fail' && r.rule.severity === 'advisory').length + flags.filter((f) => f.severity === 'advisory').length;
  await sql(dbFile, 'UPDATE entries SET gcode_sha256 = ? WHERE id = ?', [sha, entryId]);
  return insert(dbFile, 'inspections', {
    entry_id: entryId, stored_file_id: fileId, engine_version: opts.engineVersion ?? 'hotlap-inspect-1', status: 'done', report: JSON.stringify(json), preview: JSON.stringify(report.preview),
    rule_results: JSON.stringify(ruleResults), flags: JSON.stringify(flags), blocking_failures: blocking, advisory_flags: advisory,
    peak_flow_mm3s: json.flow.peak_mm3s, p95_flow_mm3s: json.flow.p95_mm3s, estimated_time_s: json.time.estimated_s, layer_height_mm: json.layers.height_mm,
    error: null, finished_at: now, created_at: now, updated_at: now,
  });
}

/** Adds a small real PNG photo (and its thumbnail) with a capture time to the entry. */
export async function addPhoto(dbFile: string, entryId: number, capturedAt = '2026-11-25T18:04:31'): Promise<{ photoId: number; thumbId: number }> {
  const dataDir = dataDirOf(dbFile);
  const png = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 215, g: 71, b: 7 } } }).png().toBuffer();
  const thumb = await sharp(png).resize(160).jpeg().toBuffer();
  const now = sqlDate();
  const [entry] = await sql<{ entrant_id: number }>(dbFile, 'SELECT entrant_id FROM entries WHERE id = ?', [entryId]);
  const put = async (kind: string, buf: Buffer, ext: string, mime: string, meta: Record<string, unknown>) => {
    const sha = crypto.createHash('sha256').update(buf).digest('hex');
    const key = `entries/${entryId}/${kind}-${sha.slice(0, 16)}-${Math.random().toString(36).slice(2, 8)}.${ext}`;
    await putTestFile(dataDir, key, buf);
    return insert(dbFile, 'stored_files', { owner_id: entry.entrant_id, entry_id: entryId, kind, original_name: `beacon-${kind}.${ext}`, mime, size_bytes: buf.length, sha256: sha, storage_key: key, meta: JSON.stringify(meta), created_at: now, updated_at: now });
  };
  const thumbId = await put('thumbnail', thumb, 'jpg', 'image/jpeg', {});
  const photoId = await put('photo', png, 'png', 'image/png', { capturedAt, thumbnailId: thumbId, locationRemoved: false });
  return { photoId, thumbId };
}

/** A complete entry on the review desk: submitted, inspected, with two photos. */
export async function createReviewableEntry(dbFile: string, opts: Parameters<typeof createSubmittedEntry>[1] & { fixture?: string } = {}) {
  const entryId = await createSubmittedEntry(dbFile, opts);
  const inspectionId = await inspectEntryWithFixture(dbFile, entryId, opts.fixture);
  await addPhoto(dbFile, entryId);
  await addPhoto(dbFile, entryId, '2026-11-25T18:05:02');
  return { entryId, inspectionId };
}
