/** The over-estimate figure and the season's one-file export (pure parts). */
import { describe, expect, it } from 'vitest';
import { formatOverEstimate, overEstimatePercent, type PublicStandingsRow } from '@/lib/standings/estimate';
import { parseCsv, seasonResultsCsv, standingsCsv } from '@/lib/standings/csv';

const row = (rank: number, o: Partial<PublicStandingsRow> = {}): PublicStandingsRow => ({
  rank, entry_id: rank * 10, entrant_id: rank, entrant: `E${rank}`, machine_id: rank, machine: `M${rank}`, motion: 'corexy', material: 'pla', nozzle_mm: 0.4,
  time_ms: 1_650_000, peak_flow_mm3s: 20, p95_flow_mm3s: 16, layer_height_mm: 0.25, date: '2026-11-20T12:00:00.000Z', verified_entries: 1,
  estimated_time_s: 1500, over_estimate_percent: 10, ...o,
});

describe('over estimate', () => {
  // Arithmetic: 1650 s ÷ 1500 s − 1 = 10 %; 1200 s ÷ 1500 s − 1 = −20 %.
  it('is claimed ÷ estimate − 1 in percent, one decimal', () => {
    expect(overEstimatePercent(1_650_000, 1500)).toBe(10);
    expect(overEstimatePercent(1_200_000, 1500)).toBe(-20);
    expect(overEstimatePercent(1_000_000, 3000)).toBe(-66.7);
    expect(overEstimatePercent(1_000_000, null)).toBeNull();
    expect(overEstimatePercent(1_000_000, 0)).toBeNull();
  });
  it('reads as a signed percentage', () => {
    expect(formatOverEstimate(10)).toBe('+10.0 %');
    expect(formatOverEstimate(-3)).toBe('−3.0 %');
    expect(formatOverEstimate(0)).toBe('±0 %');
    expect(formatOverEstimate(null)).toBe('—');
  });
});

describe('season results CSV', () => {
  it('puts every class in one file with class columns first and the estimate columns last', () => {
    const text = seasonResultsCsv([
      { class: { slug: 'open', name: 'Open, any machine' }, rows: [row(1), row(2, { estimated_time_s: null, over_estimate_percent: null })] },
      { class: { slug: 'compact', name: 'Compact' }, rows: [row(1, { entrant: '=cmd' })] },
    ]);
    const [head, ...rows] = parseCsv(text);
    expect(head.slice(0, 4)).toEqual(['class', 'class_name', 'rank', 'entry_id']);
    expect(head.slice(-2)).toEqual(['estimated_time_s', 'over_estimate_percent']);
    expect(rows.map((r) => [r[0], r[1], r[2]])).toEqual([['open', 'Open, any machine', '1'], ['open', 'Open, any machine', '2'], ['compact', 'Compact', '1']]);
    expect(rows[0].slice(-2)).toEqual(['1500', '10']);
    expect(rows[1].slice(-2)).toEqual(['', '']);
    expect(rows[2][4]).toBe("'=cmd"); // OWASP CSV injection: defused like the class CSV
    // Each class's part holds the same columns as that class's own CSV.
    expect(head.slice(2)).toEqual(parseCsv(standingsCsv([row(1)]))[0]);
  });
});
