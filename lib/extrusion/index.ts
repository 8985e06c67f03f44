/**
 * Extrusion-limit test arithmetic, framework-free.
 *
 * The trade's test: feed a fixed length of filament through the hotend at rising volumetric rates,
 * weigh each extruded sample and compare with the mass of the same length of unextruded filament.
 * Where the hotend cannot melt fast enough the extruder skips or grinds and the sample comes out
 * light, so efficiency = sample mass ÷ reference mass falls below 100 %.
 */
import { z } from 'zod';
import { densityGcm3, filamentAreaMm2, MaterialFamilySchema, type MaterialFamily } from '@/lib/inspection/materials';

export const DEFAULT_THRESHOLD_PERCENT = 98;

/** Layer heights and line widths the speed-ceiling table shows (common slicer profiles, mm). */
export const COMMON_LAYER_HEIGHTS_MM = [0.1, 0.2, 0.3] as const;
export const COMMON_LINE_WIDTHS_MM = [0.4, 0.45, 0.6] as const;

export interface ExtrusionStepInput {
  rateMm3s: number;
  massG: number;
}

export interface ExtrusionStepResult extends ExtrusionStepInput {
  efficiencyPercent: number;
  passes: boolean;
}

export interface SpeedCeiling {
  layerHeightMm: number;
  lineWidthMm: number;
  /** The speed to plan with: the flow's ceiling, or the machine's own speed limit when that is lower. */
  speedMms: number;
  /** What the flow alone would allow: Q ÷ (h × w). */
  flowSpeedMms: number;
  /** Which of the two sets `speedMms`. */
  limitedBy: 'flow' | 'machine';
}

/** The machine's own limits that cap the table (null: not given in the machine's record). */
export interface MachineSpeedLimits {
  maxSpeedMms: number | null;
}

export interface ExtrusionResult {
  /** Mass of the sample length computed from diameter and density, g. */
  expectedMassG: number;
  /** Mass the efficiencies are measured against: the weighed reference when given, else expectedMassG. */
  referenceMassG: number;
  referenceSource: 'weighed' | 'computed';
  thresholdPercent: number;
  steps: ExtrusionStepResult[];
  /** Last rate at or above the threshold before the first failing step; null when the first step fails. */
  limitFlowMm3s: number | null;
  /** True when a later step passes again after a failure (ignored for the limit; shown to the entrant). */
  nonMonotonic: boolean;
  ceilings: SpeedCeiling[];
}


/**
 * Mass of `lengthMm` of filament: volume = length × area (mm³); ÷ 1000 → cm³; × density (g/cm³).
 */
export function expectedMassG(lengthMm: number, diameterMm: number, densityGPerCm3: number): number {
  return ((lengthMm * filamentAreaMm2(diameterMm)) / 1000) * densityGPerCm3;
}

/** Speed a volumetric flow allows for one bead: v = Q ÷ (h × w) (rectangular bead, the trade's rule of thumb). */
export function speedCeilingMms(flowMm3s: number, layerHeightMm: number, lineWidthMm: number): number {
  return flowMm3s / (layerHeightMm * lineWidthMm);
}

/**
 * The speed-ceiling table: for each common layer height × line width, the speed the measured flow
 * allows, capped by the machine's own speed limit (its record's `maxSpeedMms`, e.g. the firmware's
 * maximum feed rate): a hotend that melts enough for 1,000 mm/s does not make a 600 mm/s machine
 * move faster, so the table never tells that machine more than 600 mm/s.
 */
export function speedCeilings(flowMm3s: number, machine?: MachineSpeedLimits | null): SpeedCeiling[] {
  const cap = machine?.maxSpeedMms != null && machine.maxSpeedMms > 0 ? machine.maxSpeedMms : null;
  const out: SpeedCeiling[] = [];
  for (const h of COMMON_LAYER_HEIGHTS_MM)
    for (const w of COMMON_LINE_WIDTHS_MM) {
      const flowSpeedMms = speedCeilingMms(flowMm3s, h, w);
      const capped = cap !== null && cap < flowSpeedMms;
      out.push({ layerHeightMm: h, lineWidthMm: w, flowSpeedMms, speedMms: capped ? cap : flowSpeedMms, limitedBy: capped ? 'machine' : 'flow' });
    }
  return out;
}

const positive = (what: string, max: number) =>
  z
    .number({ error: () => `${what} must be a number.` })
    .refine(Number.isFinite, `${what} must be a finite number.`)
    .refine((v) => v > 0, `${what} must be more than 0.`)
    .refine((v) => v <= max, `${what} must be at most ${max}.`);

export const ExtrusionStepSchema = z.object({
  rateMm3s: positive('The rate', 500),
  massG: z
    .number({ error: () => 'The sample mass must be a number.' })
    .refine((v) => Number.isFinite(v) && v >= 0, 'The sample mass cannot be negative.')
    .refine((v) => v <= 1000, 'The sample mass must be at most 1000 g.'),
});

/** One schema for the form and the API. */
export const ExtrusionTestSchema = z
  .object({
    materialFamily: MaterialFamilySchema,
    materialName: z.string().trim().max(120).default(''),
    filamentDiameterMm: positive('The filament diameter', 5),
    sampleLengthMm: positive('The sample length', 10_000),
    /** Weighed mass of an unextruded piece of the sample length; omitted → computed from the density. */
    referenceMassG: positive('The reference mass', 1000).optional(),
    thresholdPercent: z
      .number({ error: () => 'The threshold must be a number.' })
      .refine((v) => v >= 50 && v <= 100, 'The pass threshold must be between 50 and 100 %.')
      .default(DEFAULT_THRESHOLD_PERCENT),
    steps: z.array(ExtrusionStepSchema).min(1, 'Add at least one rate step.').max(50, 'At most 50 rate steps.'),
  })
  .superRefine((t, ctx) => {
    const seen = new Set<number>();
    t.steps.forEach((s, i) => {
      if (seen.has(s.rateMm3s)) ctx.addIssue({ code: 'custom', path: ['steps', i, 'rateMm3s'], message: `The rate ${s.rateMm3s} mm³/s is listed twice.` });
      seen.add(s.rateMm3s);
    });
  });
export type ExtrusionTestInput = z.infer<typeof ExtrusionTestSchema>;

/**
 * Computes efficiencies, the limit and the speed ceilings.
 *
 * Non-monotonic curves (a step fails, a faster one passes again — usually weighing noise or a
 * slipping extruder that recovered): the limit is the last passing rate before the FIRST failing
 * step, taken in order of rate. A later pass does not raise it, because a run that has to cross a
 * failing rate on the way cannot be trusted there (common practice, no source). `nonMonotonic`
 * tells the entrant to repeat the test.
 */
export function computeExtrusionLimit(input: {
  materialFamily: MaterialFamily;
  filamentDiameterMm: number;
  sampleLengthMm: number;
  referenceMassG?: number | null;
  thresholdPercent?: number;
  steps: ExtrusionStepInput[];
  /** The machine's own limits; the speed ceilings never exceed them. */
  machine?: MachineSpeedLimits | null;
}): ExtrusionResult {
  const threshold = input.thresholdPercent ?? DEFAULT_THRESHOLD_PERCENT;
  const expected = expectedMassG(input.sampleLengthMm, input.filamentDiameterMm, densityGcm3(input.materialFamily));
  const weighed = input.referenceMassG != null && input.referenceMassG > 0;
  const reference = weighed ? (input.referenceMassG as number) : expected;
  const steps = [...input.steps]
    .sort((a, b) => a.rateMm3s - b.rateMm3s)
    .map((s) => {
      const efficiencyPercent = (s.massG / reference) * 100;
      // Round to 0.01 % before comparing so 97.999999 from float division does not fail a 98 % step.
      return { ...s, efficiencyPercent, passes: Math.round(efficiencyPercent * 100) / 100 >= threshold };
    });
  let limit: number | null = null;
  let failed = false;
  let nonMonotonic = false;
  for (const s of steps) {
    if (!s.passes) failed = true;
    else if (!failed) limit = s.rateMm3s;
    else nonMonotonic = true;
  }
  return {
    expectedMassG: expected,
    referenceMassG: reference,
    referenceSource: weighed ? 'weighed' : 'computed',
    thresholdPercent: threshold,
    steps,
    limitFlowMm3s: limit,
    nonMonotonic,
    ceilings: limit === null ? [] : speedCeilings(limit, input.machine),
  };
}
