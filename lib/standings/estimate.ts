/**
 * The standings' "over the file's estimate" figure: how much longer the claimed time is than the
 * time the inspection estimates the G-code needs (its motion planner, with acceleration). Pure
 * functions, shared by the table (browser), the JSON rows and the CSV.
 */
import type { StandingsRow } from './query';

/** A standings row as published: the ranked row plus the inspection's time estimate. */
export interface PublicStandingsRow extends StandingsRow {
  /** The newest finished inspection's estimate of the print time, seconds; null without one. */
  estimated_time_s: number | null;
  /** claimed time ÷ estimate − 1, as a percentage (one decimal); null without an estimate. */
  over_estimate_percent: number | null;
}

/** (claimed ÷ estimate − 1) × 100, one decimal; null when there is no positive estimate. */
export function overEstimatePercent(claimedMs: number, estimatedS: number | null | undefined): number | null {
  if (estimatedS == null || !(estimatedS > 0) || !Number.isFinite(claimedMs)) return null;
  return Math.round((claimedMs / 1000 / estimatedS - 1) * 1000) / 10;
}

/** "+12.5 %", "−3.0 %", "±0 %" or "—". */
export function formatOverEstimate(percent: number | null | undefined): string {
  if (percent == null || !Number.isFinite(percent)) return '—';
  if (Math.abs(percent) < 0.05) return '±0 %';
  return `${percent > 0 ? '+' : '−'}${Math.abs(percent).toFixed(1)} %`;
}

export const OVER_ESTIMATE_LABEL = 'Over estimate';
export const OVER_ESTIMATE_EXPLANATION =
  'How much longer the claimed time is than Hotlap’s estimate of the time the G-code needs (its moves at the commanded speeds, with acceleration). ' +
  '+0 % means the print took as long as the file allows; a larger figure means a slower print than the file allows (heating, pauses, a slower machine); ' +
  'a negative figure means the claimed time is shorter than the estimate.';
