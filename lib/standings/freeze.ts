/**
 * Freezing: a final season's standings are copied once into `standings_snapshots`; from then on
 * every read of that season uses the copy, so a later review, withdrawal or edit cannot move a rank.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { parseDateColumn } from '@/lib/dbDialect';
import type { SeasonState } from '@/lib/domain';
import { LIVE_SOURCE_SQL } from './query';

/** Season states whose standings are read from the snapshot. */
export const FROZEN_STATES: readonly SeasonState[] = ['final', 'archived'];
export const isFrozenState = (state: string) => (FROZEN_STATES as readonly string[]).includes(state);

export interface FreezeResult {
  /** False when the season had already been frozen (nothing changed). */
  created: boolean;
  rows: number;
  frozenAt: string;
}

async function existing(seasonId: number, transaction?: Transaction): Promise<FreezeResult | null> {
  const [row] = await getSequelize().query<{ rows: number; frozen_at: string | Date }>('SELECT rows, frozen_at FROM standings_freezes WHERE season_id = ?', {
    replacements: [seasonId],
    type: QueryTypes.SELECT,
    transaction,
  });
  return row ? { created: false, rows: Number(row.rows), frozenAt: parseDateColumn(row.frozen_at)!.toISOString() } : null;
}

/**
 * Snapshots the ranked rows of every class of the season. Call it in the same transaction that
 * moves the season to `final`. Idempotent: a season is frozen once and never re-ranked.
 */
export async function freezeStandings(seasonId: number, transaction?: Transaction): Promise<FreezeResult> {
  const seq = getSequelize();
  const run = async (t: Transaction): Promise<FreezeResult> => {
    const before = await existing(seasonId, t);
    if (before) return before;
    const classes = await seq.query<{ id: number }>('SELECT id FROM classes WHERE season_id = ? ORDER BY id', { replacements: [seasonId], type: QueryTypes.SELECT, transaction: t });
    // Same timestamp format as Sequelize writes, so ordering and parsing agree.
    const now = new Date();
    const stamp = now.toISOString().replace('T', ' ').replace('Z', ' +00:00');
    let rows = 0;
    for (const c of classes) {
      await seq.query(
        `INSERT INTO standings_snapshots (season_id, class_id, rank, entry_id, entrant_id, entrant_name, machine_id, machine_name, motion_system,
            material_family, nozzle_mm, claimed_time_ms, submitted_at, peak_flow_mm3s, p95_flow_mm3s, layer_height_mm, verified_entries, frozen_at)
         WITH ${LIVE_SOURCE_SQL}
         SELECT :seasonId, :classId, rank, entry_id, entrant_id, entrant_name, machine_id, machine_name, motion_system,
            material_family, nozzle_mm, claimed_time_ms, submitted_at, peak_flow_mm3s, p95_flow_mm3s, layer_height_mm, verified_entries, :stamp
         FROM src ORDER BY rank`,
        { replacements: { seasonId, classId: c.id, stamp }, transaction: t },
      );
      const [n] = await seq.query<{ n: number }>('SELECT COUNT(*) AS n FROM standings_snapshots WHERE season_id = ? AND class_id = ?', { replacements: [seasonId, c.id], type: QueryTypes.SELECT, transaction: t });
      rows += Number(n.n);
    }
    await seq.query('INSERT INTO standings_freezes (season_id, rows, frozen_at) VALUES (?, ?, ?)', { replacements: [seasonId, rows, stamp], transaction: t });
    return { created: true, rows, frozenAt: now.toISOString() };
  };
  return transaction ? run(transaction) : seq.transaction(run);
}

/**
 * Makes sure a final/archived season has its snapshot (a season that reached `final` before the
 * freeze was wired, or by a direct data change, is frozen at its first read). Two first readers at
 * once: the loser's insert hits the primary key and it simply uses the winner's snapshot.
 */
const knownFrozen = new Set<number>();

export async function ensureFrozen(seasonId: number): Promise<void> {
  // A snapshot, once taken, is never removed: remember it and skip the look-up next time.
  if (knownFrozen.has(seasonId)) return;
  if (!(await existing(seasonId))) {
    try {
      await freezeStandings(seasonId);
    } catch (err) {
      if (!(await existing(seasonId))) throw err;
    }
  }
  knownFrozen.add(seasonId);
}
