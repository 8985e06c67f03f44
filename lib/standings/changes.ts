/**
 * Bringing a kept class ranking forward without re-ranking the class. The triggers that bump
 * `standings_version` for a ranking change also append to `standings_changes`, in the same
 * transaction, the counter value that bump produced and what changed
 * (migrations/20261204-r01-standings-changes.ts):
 *
 * - `entry`: an entry (or one of its inspections) of an entrant in a season and class — that
 *   entrant's best verified entry there may have changed;
 * - `entrant`: a user's name — that entrant's rows show it;
 * - `machine`: a machine's name or motion system — the rows ranked with it show them.
 *
 * A ranking kept at version `from`, asked for at `to` > `from`: read the log rows in (from, to],
 * collect the entrants of this class they name, re-read just those entrants' rows through the one
 * ranking SQL (`liveSourceSql({ forEntrants: true })`), put them in place and renumber. Cost: the
 * SQL reads O(changed entrants) rows; the in-memory merge copies the array once.
 *
 * Why it is safe with writes committing at any moment: the counter is read before the log, and a
 * bump's log rows commit with it (and bumps queue on the counter row), so every change up to `to`
 * is in the log when the counter shows `to`. The entrants' rows are read after that and may
 * already hold later changes; those changes have log rows above `to` and are applied again on the
 * next refresh — applying a change twice re-reads the same entrant, which is harmless. The result
 * is labelled `to`, never a value newer than what was read.
 *
 * Falls back to a full re-rank (returns null) when the log does not reach back to `from` (it keeps
 * only the newest STANDINGS_CHANGES_KEPT counter values, and starts at `changes_from`), when it
 * holds a kind this code does not know, or when too many rows or entrants changed.
 */
import { QueryTypes } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { isPostgres } from '@/lib/dbDialect';
import { STANDINGS_CHANGES_KEPT } from '@/migrations/20261204-r01-standings-changes';
import type { ClassRef, StandingsRow } from './query';

/** Past this many log rows or changed entrants, one full re-rank is cheaper than the look-ups. */
export const MAX_CHANGE_ROWS = 2000;
export const MAX_CHANGED_ENTRANTS = 500;

export type RefreshKind = 'cold' | 'incremental' | 'unchanged' | 'pruned' | 'too_many' | 'unknown_kind' | 'base_failed' | 'log_failed';
const counts: Record<RefreshKind, number> = { cold: 0, incremental: 0, unchanged: 0, pruned: 0, too_many: 0, unknown_kind: 0, base_failed: 0, log_failed: 0 };

/** How the ranking cache refreshed its classes in this process (tests and diagnostics). */
export function refreshCounts(): Readonly<Record<RefreshKind, number>> {
  return { ...counts };
}

export function noteRefresh(kind: RefreshKind) {
  counts[kind] += 1;
}

interface ChangeRow {
  now_version: number;
  changes_from: number | null;
  version: number | null;
  kind: string | null;
  ref_id: number | null;
  entrant_id: number | null;
  season_id: number | null;
  class_id: number | null;
}

/**
 * The log rows in (from, to], or null when the log cannot vouch for all of them. One statement, so
 * the counter now, the log's start and the rows come from one snapshot.
 */
async function readChanges(from: number, to: number): Promise<ChangeRow[] | 'pruned' | 'too_many'> {
  const rows = await getSequelize().query<ChangeRow>(
    `SELECT sv.version AS now_version, sv.changes_from, c.version, c.kind, c.ref_id, c.entrant_id, c.season_id, c.class_id
     FROM standings_version sv LEFT JOIN standings_changes c ON c.version > :from AND c.version <= :to
     WHERE sv.id = 1 LIMIT ${MAX_CHANGE_ROWS + 1}`,
    { replacements: { from, to }, type: QueryTypes.SELECT },
  );
  const head = rows[0];
  if (!head || head.changes_from == null) return 'pruned';
  // Each logging write deletes rows at or below (its counter value − KEPT): all rows above `from`
  // are still there while `from` ≥ now − KEPT, and rows exist only from `changes_from` on.
  if (from < Number(head.changes_from) || from < Number(head.now_version) - STANDINGS_CHANGES_KEPT) return 'pruned';
  if (rows.length > MAX_CHANGE_ROWS) return 'too_many';
  return rows.filter((r) => r.version != null);
}

/** The entrants of this class whose rows the changes can touch, or null for a kind we cannot apply. */
function changedEntrants(ref: ClassRef, rows: StandingsRow[], changes: ChangeRow[]): Set<number> | null {
  const out = new Set<number>();
  let ranked: Set<number> | undefined;
  let byMachine: Map<number, number[]> | undefined;
  for (const c of changes) {
    if (c.kind === 'entry') {
      if (Number(c.season_id) === ref.seasonId && Number(c.class_id) === ref.classId && c.entrant_id != null) out.add(Number(c.entrant_id));
    } else if (c.kind === 'entrant') {
      ranked ??= new Set(rows.map((r) => r.entrant_id));
      if (ranked.has(Number(c.ref_id))) out.add(Number(c.ref_id));
    } else if (c.kind === 'machine') {
      if (!byMachine) {
        byMachine = new Map();
        for (const r of rows) byMachine.set(r.machine_id, [...(byMachine.get(r.machine_id) ?? []), r.entrant_id]);
      }
      for (const id of byMachine.get(Number(c.ref_id)) ?? []) out.add(id);
    } else return null;
  }
  return out;
}

/**
 * The ranking order in JavaScript, as the SQL orders it: claimed time, then submission time, then
 * entry id. A missing submission time sorts first on SQLite and last on PostgreSQL (each
 * database's default for ascending order), as in the full ranking.
 */
export function rankingComparator(nullDatesFirst: boolean) {
  return (a: StandingsRow, b: StandingsRow): number => {
    if (a.time_ms !== b.time_ms) return a.time_ms - b.time_ms;
    if (a.date !== b.date) {
      if (a.date === null) return nullDatesFirst ? -1 : 1;
      if (b.date === null) return nullDatesFirst ? 1 : -1;
      return a.date < b.date ? -1 : 1;
    }
    return a.entry_id - b.entry_id;
  };
}

/**
 * The ranking with the rows of `changed` entrants replaced by `fresh` (their rows now; an entrant
 * missing from it left the class's ranking), renumbered. Rows whose rank stays are kept as they are
 * (the arrays kept for earlier versions share them and are never modified).
 */
export function mergeRanking(rows: StandingsRow[], changed: Set<number>, fresh: StandingsRow[], compare: (a: StandingsRow, b: StandingsRow) => number): StandingsRow[] {
  const incoming = [...fresh].sort(compare);
  const out: StandingsRow[] = [];
  let j = 0;
  for (const r of rows) {
    if (changed.has(r.entrant_id)) continue;
    while (j < incoming.length && compare(incoming[j], r) < 0) out.push(incoming[j++]);
    out.push(r);
  }
  while (j < incoming.length) out.push(incoming[j++]);
  for (let i = 0; i < out.length; i++) if (out[i].rank !== i + 1) out[i] = { ...out[i], rank: i + 1 };
  return out;
}

/**
 * `rows` (the class's ranking at counter value `from`) brought to `to`, or null when only a full
 * re-rank can do it. `reread` gives the named entrants' rows now (rankedRowsOfEntrants).
 */
export async function applyChanges(ref: ClassRef, rows: StandingsRow[], from: number, to: number, reread: (entrantIds: number[]) => Promise<StandingsRow[]>): Promise<StandingsRow[] | null> {
  const changes = await readChanges(from, to);
  if (typeof changes === 'string') {
    noteRefresh(changes);
    return null;
  }
  const changed = changedEntrants(ref, rows, changes);
  if (!changed) {
    noteRefresh('unknown_kind');
    return null;
  }
  if (changed.size > MAX_CHANGED_ENTRANTS) {
    noteRefresh('too_many');
    return null;
  }
  if (!changed.size) {
    noteRefresh('unchanged');
    return rows;
  }
  const fresh = await reread([...changed]);
  noteRefresh('incremental');
  return mergeRanking(rows, changed, fresh, rankingComparator(!isPostgres(getSequelize())));
}
