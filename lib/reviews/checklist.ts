/**
 * The judge's quality checklist: what a practitioner looks for on photos of a fast print, plus the
 * dimensional check of the entrant's measured part against the season's test piece.
 */
import { z } from 'zod';
import { sizeDeviations, DEFAULT_SCALE_TOLERANCE_PERCENT, type SizeMm } from '@/lib/inspection/plausibility';

export const CHECKLIST_ITEMS = {
  under_extrusion: { label: 'Under-extrusion', hint: 'gaps between lines, thin or missing walls, weak top layers' },
  cooling_flaws: { label: 'Cooling flaws', hint: 'drooping overhang or bridge window, curled edges' },
  layer_shifts: { label: 'Layer shifts', hint: 'layers offset in X or Y' },
  surface_artifacts: { label: 'Surface artifacts', hint: 'blobs, zits, ringing, stringing' },
  dimensional_accuracy: { label: 'Dimensional accuracy', hint: 'measured part against the test piece' },
} as const;
export type ChecklistItem = keyof typeof CHECKLIST_ITEMS;
export const CHECKLIST_ITEM_LIST = Object.keys(CHECKLIST_ITEMS) as [ChecklistItem, ...ChecklistItem[]];

/** What the judge saw for one item. */
export const CHECK_ANSWERS = ['clean', 'minor', 'fails', 'cannot_tell'] as const;
export type CheckAnswer = (typeof CHECK_ANSWERS)[number];
export const CHECK_ANSWER_LABELS: Record<CheckAnswer, string> = {
  clean: 'Clean',
  minor: 'Minor',
  fails: 'Fails',
  cannot_tell: 'Cannot tell',
};

export const ChecklistSchema = z
  .object(Object.fromEntries(CHECKLIST_ITEM_LIST.map((k) => [k, z.enum(CHECK_ANSWERS).optional()])) as Record<ChecklistItem, z.ZodOptional<z.ZodEnum<{ [K in CheckAnswer]: K }>>>)
  .strict();
export type Checklist = z.infer<typeof ChecklistSchema>;

export interface AxisDeviation {
  axis: 'x' | 'y' | 'z';
  measuredMm: number;
  referenceMm: number;
  deltaMm: number;
  percent: number;
  withinTolerance: boolean;
}

/**
 * Deviation of the entrant's measured part from the test piece, per axis, in mm and % of the test
 * piece (the engine's sizeDeviations). Null when either side is missing.
 */
export function dimensionalDeviation(
  measured: { x: number | null; y: number | null; z: number | null },
  reference: SizeMm | null,
  tolerancePercent = DEFAULT_SCALE_TOLERANCE_PERCENT,
): AxisDeviation[] | null {
  if (!reference || measured.x === null || measured.y === null || measured.z === null) return null;
  const m: SizeMm = { x: measured.x, y: measured.y, z: measured.z };
  return sizeDeviations(m, reference).map((d) => ({
    axis: d.axis,
    measuredMm: m[d.axis],
    referenceMm: reference[d.axis],
    deltaMm: d.deltaMm,
    percent: d.percent,
    withinTolerance: Math.abs(d.percent) <= tolerancePercent + 1e-9,
  }));
}
