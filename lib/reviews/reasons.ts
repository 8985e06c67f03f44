/**
 * Reason codes of judges' decisions: the one list, imported by the decision form, the route
 * handler's schema, the e-mail to the entrant and the tests. Each code says which decisions it can
 * justify, so a verification cannot be given a rejection's reason and the other way round.
 */
import type { ReviewDecision } from '@/lib/domain';

export const REASON_CODES = {
  evidence_consistent: { label: 'Photos, video and claimed time agree with the G-code', decisions: ['verify'] },
  quality_acceptable: { label: 'Print quality meets the season’s standard', decisions: ['verify'] },
  flags_explained: { label: 'Inspection flags reviewed and explained by the evidence', decisions: ['verify'] },
  timing_unconfirmed: { label: 'The evidence does not confirm the claimed time', decisions: ['reject', 'return'] },
  time_below_estimate: { label: 'Claimed time is shorter than the G-code allows', decisions: ['reject', 'return'] },
  gcode_not_printed: { label: 'The printed part does not match the uploaded G-code', decisions: ['reject', 'return'] },
  rulebook_breach: { label: 'Settings break the rulebook', decisions: ['reject', 'return'] },
  flow_beyond_machine: { label: 'Flow is beyond the machine’s measured extrusion limit', decisions: ['reject', 'return'] },
  under_extrusion: { label: 'Visible under-extrusion', decisions: ['reject', 'return'] },
  cooling_flaws: { label: 'Cooling flaws: drooping overhang or bridge, curled edges', decisions: ['reject', 'return'] },
  layer_shift: { label: 'Layer shift', decisions: ['reject', 'return'] },
  surface_artifacts: { label: 'Surface artifacts (blobs, ringing, zits, gaps)', decisions: ['reject', 'return'] },
  dimensions_off: { label: 'Measured dimensions are off the test piece', decisions: ['reject', 'return'] },
  photos_insufficient: { label: 'Photos missing, unclear or not of this print', decisions: ['reject', 'return'] },
  evidence_link_unusable: { label: 'Evidence video missing, private or incomplete', decisions: ['reject', 'return'] },
  wrong_class: { label: 'Entered in a class the machine or nozzle does not fit', decisions: ['reject', 'return'] },
  duplicate_gcode: { label: 'Same G-code as another entrant’s entry', decisions: ['reject'] },
  other: { label: 'Other reason (see the note)', decisions: ['verify', 'reject', 'return'] },
} as const satisfies Record<string, { label: string; decisions: readonly ReviewDecision[] }>;

export type ReasonCode = keyof typeof REASON_CODES;
export const REASON_CODE_LIST = Object.keys(REASON_CODES) as [ReasonCode, ...ReasonCode[]];

export function reasonsFor(decision: ReviewDecision): ReasonCode[] {
  return REASON_CODE_LIST.filter((c) => (REASON_CODES[c].decisions as readonly ReviewDecision[]).includes(decision));
}

export function reasonLabel(code: string): string {
  return code in REASON_CODES ? REASON_CODES[code as ReasonCode].label : code;
}

/** Wording of each decision for people (buttons, e-mail subjects, history). */
export const DECISION_LABELS: Record<ReviewDecision, { verb: string; past: string }> = {
  verify: { verb: 'Verify', past: 'verified' },
  reject: { verb: 'Reject', past: 'rejected' },
  return: { verb: 'Return for changes', past: 'returned for changes' },
};
