/**
 * mergeRanking and rankingComparator (lib/standings/changes.ts): changed entrants' rows replace
 * theirs in the kept ranking, in the ranking's order (claimed time, submission time, entry id;
 * a missing date first on SQLite, last on PostgreSQL), renumbered, without touching the kept array.
 * Expected orders worked by hand from the ranking rules (common practice, no source).
 */
import { describe, it, expect } from 'vitest';
import { mergeRanking, rankingComparator } from '@/lib/standings/changes';
import type { StandingsRow } from '@/lib/standings/query';

const row = (entrant: number, entry: number, timeMs: number, date: string | null = '2026-11-10T12:00:00.000Z'): StandingsRow => ({
  rank: 0, entry_id: entry, entrant_id: entrant, entrant: `E${entrant}`, machine_id: entrant, machine: `M${entrant}`, motion: 'corexy', material: 'pla',
  nozzle_mm: 0.4, time_ms: timeMs, peak_flow_mm3s: null, p95_flow_mm3s: null, layer_height_mm: null, date, verified_entries: 1,
});
const ranked = (rows: StandingsRow[]) => rows.map((r, i) => ({ ...r, rank: i + 1 }));
const sqlite = rankingComparator(true);
const postgres = rankingComparator(false);

describe('mergeRanking', () => {
  const kept = ranked([row(1, 10, 1000), row(2, 20, 2000), row(3, 30, 3000), row(4, 40, 4000)]);

  it('moves a changed entrant to its new place and renumbers', () => {
    const out = mergeRanking(kept, new Set([4]), [row(4, 41, 1500)], sqlite);
    expect(out.map((r) => [r.rank, r.entrant_id])).toEqual([[1, 1], [2, 4], [3, 2], [4, 3]]);
    expect(kept.map((r) => r.rank)).toEqual([1, 2, 3, 4]); // the kept array and its rows are untouched
    expect(out[0]).toBe(kept[0]); // an unmoved row is shared
  });

  it('drops an entrant with no row left and adds a new one', () => {
    const out = mergeRanking(kept, new Set([2, 5]), [row(5, 50, 5000)], sqlite);
    expect(out.map((r) => [r.rank, r.entrant_id])).toEqual([[1, 1], [2, 3], [3, 4], [4, 5]]);
  });

  it('breaks ties on time by submission time, then by entry id', () => {
    const out = mergeRanking(kept, new Set([5, 6]), [row(6, 60, 2000, '2026-11-10T12:00:00.000Z'), row(5, 5, 2000, '2026-11-09T12:00:00.000Z')], sqlite);
    // Entrant 5 submitted a day earlier; entrant 6 ties entrant 2 on date too and has the higher entry id.
    expect(out.map((r) => r.entrant_id)).toEqual([1, 5, 2, 6, 3, 4]);
  });

  it('puts a missing submission time first on SQLite and last on PostgreSQL, as each database sorts NULL', () => {
    const tie = ranked([row(1, 10, 1000), row(2, 20, 2000)]);
    expect(mergeRanking(tie, new Set([3]), [row(3, 30, 2000, null)], sqlite).map((r) => r.entrant_id)).toEqual([1, 3, 2]);
    expect(mergeRanking(tie, new Set([3]), [row(3, 30, 2000, null)], postgres).map((r) => r.entrant_id)).toEqual([1, 2, 3]);
  });
});
