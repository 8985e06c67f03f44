/**
 * Reading an inspection row for the queue: which kind of attention it needs. Works on the stored
 * rule results and flags (engine shapes: RuleResult from lib/inspection/rules, Flag from types).
 */
import type { FlagCode } from '@/lib/inspection/plausibility';

/** Flags that compare the entrant's claims with the G-code (time, flow vs machine, size, duplicate). */
export const PLAUSIBILITY_FLAG_CODES: readonly FlagCode[] = [
  'claimed_time_below_estimate',
  'mean_flow_above_machine_limit',
  'peak_flow_above_machine_limit',
  'dimensions_off_test_piece',
  'scale_off_test_piece',
  'duplicate_gcode',
];

/** Queue filters by what an inspection found. */
export const QUEUE_FLAG_FILTERS = {
  blocking_overridden: 'Blocking rule failed (submitted anyway, or found by a re-inspection)',
  advisory: 'Advisory flags',
  plausibility: 'Plausibility flags',
  clean: 'No flags',
} as const;
export type QueueFlagFilter = keyof typeof QUEUE_FLAG_FILTERS;
export const QUEUE_FLAG_FILTER_LIST = Object.keys(QUEUE_FLAG_FILTERS) as [QueueFlagFilter, ...QueueFlagFilter[]];

interface StoredFlag {
  code?: unknown;
  severity?: unknown;
  message?: unknown;
}
interface StoredRuleResult {
  status?: unknown;
  rule?: { severity?: unknown; metric?: unknown } | null;
}

export interface InspectionLike {
  ruleResults: unknown[];
  flags: unknown[];
  blockingFailures: number;
  advisoryFlags: number;
}

export function asFlags(v: unknown): { code: string; severity: string; message: string }[] {
  if (!Array.isArray(v)) return [];
  return (v as StoredFlag[])
    .filter((f) => f && typeof f.code === 'string')
    .map((f) => ({ code: String(f.code), severity: String(f.severity ?? 'info'), message: String(f.message ?? '') }));
}

/** Which queue filters an entry's latest inspection matches (none → `clean`). */
export function flagKinds(i: InspectionLike | null): QueueFlagFilter[] {
  if (!i) return [];
  const kinds = new Set<QueueFlagFilter>();
  const rules = Array.isArray(i.ruleResults) ? (i.ruleResults as StoredRuleResult[]) : [];
  const flags = asFlags(i.flags);
  if (i.blockingFailures > 0 || rules.some((r) => r?.status === 'fail' && r.rule?.severity === 'blocking')) kinds.add('blocking_overridden');
  if (
    i.advisoryFlags > 0 ||
    rules.some((r) => r?.status === 'fail' && r.rule?.severity === 'advisory') ||
    flags.some((f) => f.severity === 'advisory')
  ) kinds.add('advisory');
  if (flags.some((f) => (PLAUSIBILITY_FLAG_CODES as readonly string[]).includes(f.code))) kinds.add('plausibility');
  if (kinds.size === 0) kinds.add('clean');
  return [...kinds];
}
