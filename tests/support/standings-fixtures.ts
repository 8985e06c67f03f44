/**
 * Arranges standings scenarios directly in a test server's SQLite file: a season with classes,
 * entrants, machines, entries in any state and finished inspections with chosen figures.
 * Dates use the format Sequelize writes ("YYYY-MM-DD HH:MM:SS.SSS +00:00").
 */
import { sql } from './db';
import { reportWith } from './reports';
import type { InspectionReport } from '@/lib/inspection/contract';

export const stamp = (d: Date | string) => new Date(d).toISOString().replace('T', ' ').replace('Z', ' +00:00');
const now = () => stamp(new Date());

async function insert(db: string, table: string, row: Record<string, unknown>): Promise<number> {
  const cols = Object.keys(row);
  const [r] = await sql<{ id: number }>(db, `INSERT INTO ${table} (${cols.join(', ')}) VALUES (${cols.map(() => '?').join(', ')}) RETURNING id`, Object.values(row));
  return r.id;
}

let seq = 0;
const unique = (prefix: string) => `${prefix}-${process.pid.toString(36)}-${Date.now().toString(36)}-${(seq++).toString(36)}`;

export async function insertSeason(db: string, opts: { state?: string; classes?: string[]; name?: string; opensAt?: string } = {}) {
  const slug = unique('s');
  const t = now();
  const seasonId = await insert(db, 'seasons', {
    slug, name: opts.name ?? `Test season ${slug}`, host_name: 'Test club', description: '', state: opts.state ?? 'open',
    opens_at: stamp(opts.opensAt ?? '2026-11-01T00:00:00Z'), closes_at: stamp('2027-01-31T00:00:00Z'), created_at: t, updated_at: t,
  });
  const classIds: Record<string, number> = {};
  for (const [i, c] of (opts.classes ?? ['open']).entries()) {
    classIds[c] = await insert(db, 'classes', { season_id: seasonId, slug: c, name: `Class ${c}`, display_order: i, created_at: t, updated_at: t });
  }
  return { seasonId, slug, classIds };
}

export async function insertEntrant(db: string, name: string): Promise<number> {
  const t = now();
  return insert(db, 'users', { email: `${unique('u')}@example.org`, name, password_hash: 'x', roles: '["entrant"]', created_at: t, updated_at: t });
}

export async function insertMachine(db: string, ownerId: number, name: string, motion = 'corexy'): Promise<number> {
  const t = now();
  return insert(db, 'machines', { owner_id: ownerId, name, motion_system: motion, build_x_mm: 200, build_y_mm: 200, build_z_mm: 200, nozzle_mm: 0.4, created_at: t, updated_at: t });
}

export interface EntrySpec {
  seasonId: number;
  classId: number;
  entrantId: number;
  machineId: number;
  timeMs: number;
  submittedAt: string;
  state?: string;
  material?: string;
  nozzleMm?: number;
  /** Inspection figures; omitted = no finished inspection. */
  peak?: number | null;
  p95?: number;
  layerMm?: number;
  report?: Record<string, unknown>;
}

export async function insertEntry(db: string, e: EntrySpec): Promise<number> {
  const t = now();
  const id = await insert(db, 'entries', {
    season_id: e.seasonId, class_id: e.classId, entrant_id: e.entrantId, machine_id: e.machineId, material_family: e.material ?? 'pla',
    nozzle_mm: e.nozzleMm ?? 0.4, claimed_time_ms: e.timeMs, state: e.state ?? 'verified', submitted_at: stamp(e.submittedAt),
    decided_at: (e.state ?? 'verified') === 'verified' ? stamp(new Date(new Date(e.submittedAt).getTime() + 86_400_000)) : null, created_at: t, updated_at: t,
  });
  if (e.peak !== undefined) await insertInspection(db, id, { peak: e.peak, p95: e.p95 ?? (e.peak ?? 0) * 0.8, layerMm: e.layerMm ?? 0.25, report: e.report });
  return id;
}

export async function insertInspection(db: string, entryId: number, f: { peak: number | null; p95: number; layerMm: number; status?: string; createdAt?: string; report?: Record<string, unknown> }) {
  const t = f.createdAt ? stamp(f.createdAt) : now();
  return insert(db, 'inspections', {
    entry_id: entryId, engine_version: 'test', status: f.status ?? 'done', peak_flow_mm3s: f.peak, p95_flow_mm3s: f.p95, layer_height_mm: f.layerMm,
    estimated_time_s: 1500, report: JSON.stringify(f.report ?? sampleReport(f.peak ?? 20, f.p95, f.layerMm)), rule_results: JSON.stringify([{ status: 'pass' }, { status: 'pass' }]),
    flags: '[]', finished_at: t, created_at: t, updated_at: t,
  });
}

/** A complete report (the contract) with the figures the entry page reads. */
export function sampleReport(peak: number, p95: number, layerMm: number): InspectionReport {
  const n = 60;
  return reportWith({
    layers: { count: Math.round(40 / layerMm), height_mm: layerMm, first_height_mm: 0.3 },
    flow: {
      peak_mm3s: peak,
      p95_mm3s: p95,
      mean_mm3s: p95 * 0.7,
      time_series: {
        bucket_s: 25,
        max_mm3s: Array.from({ length: n }, (_, i) => Math.round((p95 + (peak - p95) * Math.abs(Math.sin(i / 5))) * 1000) / 1000),
        mean_mm3s: Array.from({ length: n }, () => p95 * 0.7),
      },
    },
    filament: { length_mm: 4200, mass_g: 12.5 },
    time: { estimated_s: 1480 },
  });
}

export async function setSeasonState(db: string, seasonId: number, state: string) {
  await sql(db, 'UPDATE seasons SET state = ? WHERE id = ?', [state, seasonId]);
}
