/**
 * The ranking: per class, the best verified entry of each entrant, ordered by claimed time, ties to
 * the earlier submission and then the lower entry id. Live seasons rank from `entries`; final and
 * archived seasons read the frozen copy in `standings_snapshots` (lib/standings/freeze.ts), so the
 * same filters, sorting and paging run over either source.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { getSequelize } from '@/lib/db';
import type { StandingsQuery, SortKey } from './params';

/** One ranked row, snake_case as the API and CSV publish it. */
export interface StandingsRow {
  rank: number;
  entry_id: number;
  entrant_id: number;
  entrant: string;
  machine_id: number;
  machine: string;
  motion: string;
  material: string;
  nozzle_mm: number;
  time_ms: number;
  peak_flow_mm3s: number | null;
  p95_flow_mm3s: number | null;
  layer_height_mm: number | null;
  date: string | null;
  /** How many verified entries this entrant has in the class (the row shows the best). */
  verified_entries: number;
}

export interface StandingsPage {
  rows: StandingsRow[];
  total: number;
  page: number;
  per_page: number;
  pages: number;
  frozen: boolean;
}

/** Columns every source CTE yields, in this order. */
const SOURCE_COLUMNS =
  'rank, entry_id, entrant_id, entrant_name, machine_id, machine_name, motion_system, material_family, nozzle_mm, claimed_time_ms, submitted_at, peak_flow_mm3s, p95_flow_mm3s, layer_height_mm, verified_entries';

/**
 * Live ranking of one class. ROW_NUMBER over the entrant partition picks each entrant's best entry;
 * the WHERE on (season_id, class_id, state) and the ORDER BY claimed_time_ms, submitted_at follow
 * the `entries_standings` index. The inspection figures come from the newest finished inspection.
 */
export const LIVE_SOURCE_SQL = `
  best AS (
    SELECT e.id AS entry_id, e.entrant_id, e.machine_id, e.material_family, e.nozzle_mm, e.claimed_time_ms, e.submitted_at,
           ROW_NUMBER() OVER (PARTITION BY e.entrant_id ORDER BY e.claimed_time_ms, e.submitted_at, e.id) AS nth,
           COUNT(*) OVER (PARTITION BY e.entrant_id) AS verified_entries
    FROM entries e
    WHERE e.season_id = :seasonId AND e.class_id = :classId AND e.state = 'verified'
  ),
  src AS (
    SELECT ROW_NUMBER() OVER (ORDER BY b.claimed_time_ms, b.submitted_at, b.entry_id) AS rank,
           b.entry_id, b.entrant_id, u.name AS entrant_name, b.machine_id, m.name AS machine_name, m.motion_system,
           b.material_family, b.nozzle_mm, b.claimed_time_ms, b.submitted_at,
           i.peak_flow_mm3s, i.p95_flow_mm3s, i.layer_height_mm, b.verified_entries
    FROM best b
    JOIN users u ON u.id = b.entrant_id
    JOIN machines m ON m.id = b.machine_id
    LEFT JOIN inspections i ON i.id = (
      SELECT i2.id FROM inspections i2 WHERE i2.entry_id = b.entry_id AND i2.status = 'done'
      ORDER BY i2.created_at DESC, i2.id DESC LIMIT 1)
    WHERE b.nth = 1
  )`;

const SNAPSHOT_SOURCE_SQL = `
  src AS (
    SELECT ${SOURCE_COLUMNS} FROM standings_snapshots WHERE season_id = :seasonId AND class_id = :classId
  )`;

const SORT_SQL: Record<SortKey, string> = {
  rank: 'rank',
  time: 'claimed_time_ms',
  peak_flow: 'peak_flow_mm3s',
  p95_flow: 'p95_flow_mm3s',
  layer_height: 'layer_height_mm',
  date: 'submitted_at',
  entrant: 'entrant_name COLLATE NOCASE',
  machine: 'machine_name COLLATE NOCASE',
  nozzle: 'nozzle_mm',
};

/** LIKE pattern for a literal substring (%, _ and \ escaped). */
export function likePattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

function filterSql(q: Pick<StandingsQuery, 'material' | 'motion' | 'q'>, repl: Record<string, unknown>): string {
  const where: string[] = [];
  if (q.material) {
    where.push('material_family = :material');
    repl.material = q.material;
  }
  if (q.motion) {
    where.push('motion_system = :motion');
    repl.motion = q.motion;
  }
  if (q.q) {
    where.push("machine_name LIKE :q ESCAPE '\\'");
    repl.q = likePattern(q.q);
  }
  return where.length ? `WHERE ${where.join(' AND ')}` : '';
}

function orderSql(q: Pick<StandingsQuery, 'sort' | 'desc'>): string {
  const col = SORT_SQL[q.sort];
  // Rows without a figure go last in either direction; equal values keep the standings order.
  return `ORDER BY (${col.split(' ')[0]} IS NULL), ${col} ${q.desc ? 'DESC' : 'ASC'}, rank ASC`;
}

interface RawRow {
  rank: number;
  entry_id: number;
  entrant_id: number;
  entrant_name: string;
  machine_id: number;
  machine_name: string;
  motion_system: string;
  material_family: string;
  nozzle_mm: number;
  claimed_time_ms: number;
  submitted_at: string | null;
  peak_flow_mm3s: number | null;
  p95_flow_mm3s: number | null;
  layer_height_mm: number | null;
  verified_entries: number;
  total?: number;
}

/** SQLite keeps Sequelize dates as "YYYY-MM-DD HH:MM:SS.SSS +00:00"; publish ISO 8601. */
export function isoDate(v: string | Date | null): string | null {
  if (v == null) return null;
  const d = v instanceof Date ? v : new Date(String(v).replace(' ', 'T').replace(' ', ''));
  return Number.isNaN(d.getTime()) ? null : d.toISOString();
}

/** The published figures of one run, from the raw column names the queries select. */
export function runFields(r: Pick<RawRow, 'machine_name' | 'motion_system' | 'material_family' | 'nozzle_mm' | 'claimed_time_ms' | 'peak_flow_mm3s' | 'p95_flow_mm3s' | 'layer_height_mm' | 'submitted_at'>) {
  return {
    machine: r.machine_name,
    motion: r.motion_system,
    material: r.material_family,
    nozzle_mm: r.nozzle_mm,
    time_ms: r.claimed_time_ms,
    peak_flow_mm3s: r.peak_flow_mm3s,
    p95_flow_mm3s: r.p95_flow_mm3s,
    layer_height_mm: r.layer_height_mm,
    date: isoDate(r.submitted_at),
  };
}

function toRow(r: RawRow): StandingsRow {
  return {
    rank: Number(r.rank),
    entry_id: r.entry_id,
    entrant_id: r.entrant_id,
    entrant: r.entrant_name,
    machine_id: r.machine_id,
    ...runFields(r),
    verified_entries: Number(r.verified_entries),
  };
}

export interface ClassRef {
  seasonId: number;
  classId: number;
  frozen: boolean;
}

export function sourceSql(frozen: boolean): string {
  return `WITH ${frozen ? SNAPSHOT_SOURCE_SQL : LIVE_SOURCE_SQL}`;
}

/** One page of a class's standings with the filters and sort of `q`. */
export async function standingsPage(ref: ClassRef, q: StandingsQuery, opts: { all?: boolean; transaction?: Transaction } = {}): Promise<StandingsPage> {
  const repl: Record<string, unknown> = { seasonId: ref.seasonId, classId: ref.classId };
  const where = filterSql(q, repl);
  const all = opts.all ?? false;
  let limit = '';
  if (!all) {
    limit = 'LIMIT :limit OFFSET :offset';
    repl.limit = q.perPage;
    repl.offset = (q.page - 1) * q.perPage;
  }
  const seq = getSequelize();
  const sql = `${sourceSql(ref.frozen)}
    SELECT ${SOURCE_COLUMNS}, COUNT(*) OVER () AS total FROM src ${where} ${orderSql(q)} ${limit}`;
  const raw = await seq.query<RawRow>(sql, { replacements: repl, type: QueryTypes.SELECT, transaction: opts.transaction });
  let total = raw.length ? Number(raw[0].total) : 0;
  if (!raw.length && !all && q.page > 1) {
    // Past the last page: still say how many rows the view has.
    const [c] = await seq.query<{ n: number }>(`${sourceSql(ref.frozen)} SELECT COUNT(*) AS n FROM src ${where}`, { replacements: repl, type: QueryTypes.SELECT, transaction: opts.transaction });
    total = Number(c.n);
  }
  const perPage = all ? Math.max(total, 1) : q.perPage;
  return { rows: raw.map(toRow), total, page: all ? 1 : q.page, per_page: perPage, pages: Math.max(1, Math.ceil(total / perPage)), frozen: ref.frozen };
}

/** The standings rank of the given entries (only entries that are their entrant's ranked row get one). */
export async function ranksOf(ref: ClassRef, entryIds: number[]): Promise<Map<number, number>> {
  const out = new Map<number, number>();
  if (!entryIds.length) return out;
  const rows = await getSequelize().query<{ rank: number; entry_id: number }>(
    `${sourceSql(ref.frozen)} SELECT rank, entry_id FROM src WHERE entry_id IN (:ids)`,
    { replacements: { seasonId: ref.seasonId, classId: ref.classId, ids: entryIds }, type: QueryTypes.SELECT },
  );
  for (const r of rows) out.set(r.entry_id, Number(r.rank));
  return out;
}

/** The query plan of the live ranking, for checking that it searches the standings index. */
export async function explainLiveRanking(seasonId: number, classId: number): Promise<string[]> {
  const rows = await getSequelize().query<{ detail: string }>(
    `EXPLAIN QUERY PLAN ${sourceSql(false)} SELECT ${SOURCE_COLUMNS} FROM src ORDER BY rank LIMIT 25`,
    { replacements: { seasonId, classId }, type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.detail);
}
