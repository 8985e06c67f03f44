/**
 * The ranking: per class, the best verified entry of each entrant, ordered by claimed time, ties to
 * the earlier submission and then the lower entry id. Live seasons rank from `entries`; final and
 * archived seasons read the frozen copy in `standings_snapshots` (lib/standings/freeze.ts), so the
 * same filters, sorting and paging run over either source.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { explainPlan, listTriggers } from '@/lib/dbDialect';
import type { StandingsQuery, SortKey } from './params';
import { STANDINGS_TRIGGERS } from '@/migrations/20261201-0402-standings-version';
import { PUBLIC_READ_TRIGGERS } from '@/migrations/20261203-1801-standings-version-public-reads';
import { ENTRY_PAGE_TRIGGERS } from '@/migrations/20261204-p01-standings-version-entry-pages';
import { closeCounterReader, readCounter } from './version';
import { applyChanges, noteRefresh } from './changes';

/** Every trigger that bumps `standings_version`; without all of them the counter can miss a change. */
const TRIGGER_NAMES = [...new Set([...STANDINGS_TRIGGERS, ...PUBLIC_READ_TRIGGERS, ...ENTRY_PAGE_TRIGGERS].map(([name]) => name))];

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
 * the `entries_standings` index. The inspection figures come from the newest finished inspection
 * (an index-only look-up in `inspections_newest_done`: entry_id, status, created_at, id).
 *
 * `forEntrants`: the same definition restricted to the entrants in `:entrantIds` — their rows as the
 * whole ranking has them, except `rank` (numbered among those entrants only). The incremental
 * refresh (lib/standings/changes.ts) re-reads changed entrants through it.
 */
export function liveSourceSql(opts: { forEntrants?: boolean } = {}): string {
  return `
  best AS (
    SELECT e.id AS entry_id, e.entrant_id, e.machine_id, e.material_family, e.nozzle_mm, e.claimed_time_ms, e.submitted_at,
           ROW_NUMBER() OVER (PARTITION BY e.entrant_id ORDER BY e.claimed_time_ms, e.submitted_at, e.id) AS nth,
           COUNT(*) OVER (PARTITION BY e.entrant_id) AS verified_entries
    FROM entries e
    WHERE e.season_id = :seasonId AND e.class_id = :classId AND e.state = 'verified'${opts.forEntrants ? ' AND e.entrant_id IN (:entrantIds)' : ''}
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
}

export const LIVE_SOURCE_SQL = liveSourceSql();

const SNAPSHOT_SOURCE_SQL = `
  src AS (
    SELECT ${SOURCE_COLUMNS} FROM standings_snapshots WHERE season_id = :seasonId AND class_id = :classId
  )`;

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

/** SQLite keeps Sequelize dates as "YYYY-MM-DD HH:MM:SS.SSS +00:00", PostgreSQL returns a Date; publish ISO 8601. */
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

/** Every ranked row of one class, computed in SQL (the ranking is defined there once). */
export async function computeRanked(ref: ClassRef, transaction?: Transaction): Promise<StandingsRow[]> {
  const raw = await getSequelize().query<RawRow>(`${sourceSql(ref.frozen)} SELECT ${SOURCE_COLUMNS} FROM src ORDER BY rank`, {
    replacements: { seasonId: ref.seasonId, classId: ref.classId },
    type: QueryTypes.SELECT,
    transaction,
  });
  return raw.map(toRow);
}

/**
 * The ranked rows of just these entrants in a live class (none for an entrant without a verified
 * entry there), by the same SQL; `rank` counts among them only — the caller places them.
 */
export async function rankedRowsOfEntrants(ref: Omit<ClassRef, 'frozen'>, entrantIds: number[]): Promise<StandingsRow[]> {
  if (!entrantIds.length) return [];
  const raw = await getSequelize().query<RawRow>(`WITH ${liveSourceSql({ forEntrants: true })} SELECT ${SOURCE_COLUMNS} FROM src ORDER BY rank`, {
    replacements: { seasonId: ref.seasonId, classId: ref.classId, entrantIds },
    type: QueryTypes.SELECT,
  });
  return raw.map(toRow);
}

/**
 * The ranked rows of a class, from the in-process cache while `standings_version` (bumped by
 * triggers on every relevant write, migrations/20261201-0402) is unchanged. When the counter moved,
 * a live class kept at an older version is brought forward from the change log (changes.ts:
 * only the entrants named in the log are re-read); when that cannot be done, it is re-ranked in
 * full. Frozen snapshots never change, so they stay cached. Concurrent readers of a stale class
 * share one refresh.
 */
const CACHE_CLASSES = 32;
interface Kept {
  version: number;
  rows: Promise<StandingsRow[]>;
}
const cache = new Map<string, Kept>();
let triggersChecked: boolean | null = null;

/**
 * The database's standings change counter, or null when its triggers are missing (then nothing may
 * be cached on it). Read from the database on every call, so several web servers sharing the
 * database see each other's writes at once.
 */
export async function standingsVersion(): Promise<number | null> {
  const seq = getSequelize();
  if (triggersChecked === null) {
    const names = new Set(await listTriggers(seq));
    triggersChecked = TRIGGER_NAMES.every((n) => names.has(n));
    if (!triggersChecked) console.warn('standings: change triggers are missing (a table was rebuilt?); ranking every request without the cache.');
  }
  if (!triggersChecked) return null;
  return readCounter();
}

/** The kept rows at `base.version`, brought to `version` from the change log, else ranked anew. */
async function refresh(ref: ClassRef, base: Kept, version: number): Promise<StandingsRow[]> {
  let rows: StandingsRow[];
  try {
    rows = await base.rows;
  } catch {
    noteRefresh('base_failed');
    return computeRanked(ref);
  }
  let next: StandingsRow[] | null;
  try {
    next = await applyChanges(ref, rows, base.version, version, (ids) => rankedRowsOfEntrants(ref, ids));
  } catch (err) {
    // The log could not be read (a database without it?): the full re-rank still answers.
    console.warn('standings: change log unreadable, re-ranking the class in full:', err instanceof Error ? err.message : err);
    noteRefresh('log_failed');
    next = null;
  }
  return next ?? computeRanked(ref);
}

export async function rankedRows(ref: ClassRef, opts: { transaction?: Transaction } = {}): Promise<StandingsRow[]> {
  // Inside a caller's transaction the rows must be what that transaction sees: no cache.
  if (opts.transaction) return computeRanked(ref, opts.transaction);
  const version = ref.frozen ? -1 : await standingsVersion();
  if (version === null) return computeRanked(ref);
  const key = `${ref.frozen ? 'f' : 'l'}:${ref.seasonId}:${ref.classId}`;
  const hit = cache.get(key);
  if (hit && hit.version === version) {
    cache.delete(key);
    cache.set(key, hit); // most recently used last
    return hit.rows;
  }
  // The label is the counter value read before any row: the rows are never older than it.
  let rows: Promise<StandingsRow[]>;
  // Only forward: a counter below the kept one (a slower reader, or a restored database) re-ranks.
  if (hit && !ref.frozen && hit.version < version) rows = refresh(ref, hit, version);
  else {
    noteRefresh('cold');
    rows = computeRanked(ref);
  }
  const kept = { version, rows };
  cache.set(key, kept);
  rows.catch(() => {
    if (cache.get(key) === kept) cache.delete(key);
  });
  while (cache.size > CACHE_CLASSES) cache.delete(cache.keys().next().value as string);
  return rows;
}

/** Forget cached rankings (tests and tools that rewrite the database wholesale). */
export function clearStandingsCache() {
  cache.clear();
  triggersChecked = null;
  closeCounterReader();
}

type SortValue = (r: StandingsRow) => number | string | null;
const SORT_VALUE: Record<SortKey, SortValue> = {
  rank: (r) => r.rank,
  time: (r) => r.time_ms,
  peak_flow: (r) => r.peak_flow_mm3s,
  p95_flow: (r) => r.p95_flow_mm3s,
  layer_height: (r) => r.layer_height_mm,
  date: (r) => r.date,
  entrant: (r) => r.entrant.toLowerCase(),
  machine: (r) => r.machine.toLowerCase(),
  nozzle: (r) => r.nozzle_mm,
};

/** Filters of the query, applied to ranked rows (ranks stay the class ranks). */
export function filterRows(rows: StandingsRow[], q: Pick<StandingsQuery, 'material' | 'motion' | 'q'>): StandingsRow[] {
  const needle = q.q?.toLowerCase();
  if (!q.material && !q.motion && !needle) return rows;
  return rows.filter((r) => (!q.material || r.material === q.material) && (!q.motion || r.motion === q.motion) && (!needle || r.machine.toLowerCase().includes(needle)));
}

/** Sorted copy: rows without the figure go last in either direction; equal values keep the standings order. */
export function sortRows(rows: StandingsRow[], q: Pick<StandingsQuery, 'sort' | 'desc'>): StandingsRow[] {
  if (q.sort === 'rank' && !q.desc) return rows;
  const value = SORT_VALUE[q.sort];
  const dir = q.desc ? -1 : 1;
  return [...rows].sort((a, b) => {
    const va = value(a);
    const vb = value(b);
    if (va === null || vb === null) return va === vb ? a.rank - b.rank : va === null ? 1 : -1;
    if (va !== vb) return (va < vb ? -1 : 1) * dir;
    return a.rank - b.rank;
  });
}

/** One page of a class's standings with the filters and sort of `q` (or the whole view with `all`). */
export async function standingsPage(ref: ClassRef, q: StandingsQuery, opts: { all?: boolean } = {}): Promise<StandingsPage> {
  const view = sortRows(filterRows(await rankedRows(ref), q), q);
  const total = view.length;
  if (opts.all) return { rows: view, total, page: 1, per_page: Math.max(total, 1), pages: 1, frozen: ref.frozen };
  const start = (q.page - 1) * q.perPage;
  return { rows: view.slice(start, start + q.perPage), total, page: q.page, per_page: q.perPage, pages: Math.max(1, Math.ceil(total / q.perPage)), frozen: ref.frozen };
}

/** The standings rank of the given entries (only entries that are their entrant's ranked row get one). */
export async function ranksOf(ref: ClassRef, entryIds: number[]): Promise<Map<number, number>> {
  const want = new Set(entryIds);
  const out = new Map<number, number>();
  if (!want.size) return out;
  for (const r of await rankedRows(ref)) if (want.has(r.entry_id)) out.set(r.entry_id, r.rank);
  return out;
}

/** The query plan of the live ranking, for checking that it searches the standings index. */
export async function explainLiveRanking(seasonId: number, classId: number): Promise<string[]> {
  return explainPlan(getSequelize(), `${sourceSql(false)} SELECT ${SOURCE_COLUMNS} FROM src ORDER BY rank`, { seasonId, classId });
}
