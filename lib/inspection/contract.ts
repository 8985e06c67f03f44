/**
 * The report contract: the one shape of an inspection report outside the engine — what the CLI
 * prints with --json, what the job stores in inspections.report, what the review desk, the entrant
 * pages and /api/v1 read. snake_case keys with units in the names; numbers rounded for reading and
 * never NaN (null where there is no figure).
 *
 * The TypeScript type is inferred from the zod schema, and toJsonReport() (report.ts) is typed to
 * return it, so the writer and the schema cannot drift apart without the compiler noticing;
 * parseInspectionReport() checks a stored or received report at run time.
 */
import { z } from 'zod';
import { RuleSchema } from './rules';
import { FEATURE_KINDS } from './types';
import { ToolpathPreviewSchema, type ToolpathPreview } from './preview';


const n = z.number();
const nn = z.number().nullable();

export const FlagSchema = z.strictObject({
  code: z.string(),
  severity: z.enum(['info', 'advisory', 'blocking']),
  message: z.string(),
});

export const RuleResultSchema = z.strictObject({
  rule: RuleSchema,
  status: z.enum(['pass', 'fail', 'unknown']),
  measured: z.union([n, z.boolean()]).nullable(),
  source: z.enum(['declared', 'measured', 'claimed', 'option', 'default']).nullable(),
  message: z.string(),
});

/** A layer whose wall count is above the count most layers have (e.g. extra loops on a slope). */
export const ExtraLoopLayerSchema = z.strictObject({ z_mm: n, walls: z.number().int() });

export const SettingPairSchema = z.strictObject({
  declared: nn,
  measured: nn,
  detail: z.string().optional(),
  /** walls only: layers printed with more loops than `measured` (at most EXTRA_LOOP_LAYERS_LISTED, lowest first). */
  extra_loop_layers: z.array(ExtraLoopLayerSchema).optional(),
  /** walls only: how many layers have extra loops in all (the list may be cut). */
  extra_loop_layer_count: z.number().int().optional(),
});

export const SETTING_KEYS = ['infill_percent', 'walls', 'top_layers', 'bottom_layers', 'layer_height_mm', 'nozzle_mm', 'first_layer_height_mm', 'line_width_mm'] as const;
export type SettingKey = (typeof SETTING_KEYS)[number];

const FeatureJsonSchema = z.strictObject({
  length_mm: nn,
  volume_mm3: nn,
  commanded_time_s: nn,
  line_width_mm: z.strictObject({ mean: nn, min: nn, max: nn }),
  speed_mms: z.strictObject({ min: nn, max: nn, mean: nn }),
});

export const InspectionReportSchema = z.strictObject({
  file: z.strictObject({ name: z.string().nullable(), bytes: n, text_bytes: n, gzip: z.boolean(), lines: n }),
  slicer: z.strictObject({ dialect: z.string(), generator: z.string().nullable() }),
  filament: z.strictObject({
    diameter_mm: n,
    area_mm2: nn,
    length_mm: nn,
    total_length_mm: nn,
    preamble_mm: nn,
    preamble_detail: z.string(),
    volume_mm3: nn,
    mass_g: nn,
    material: z.string(),
    density_gcm3: n,
    density_source: z.string(),
    retractions: n,
    retracted_mm: nn,
  }),
  flow: z.strictObject({
    peak_mm3s: nn,
    peak_line: nn,
    p95_mm3s: nn,
    mean_mm3s: nn,
    histogram: z.strictObject({ bin_mm3s: n, time_s: z.array(n) }),
    time_series: z.strictObject({ bucket_s: n, max_mm3s: z.array(n), mean_mm3s: z.array(n) }),
  }),
  layers: z.strictObject({ count: n, height_mm: nn, first_height_mm: nn, z_mm: z.array(n), time_s: z.array(n) }),
  size_mm: z.strictObject({ x: n, y: n, z: n }).nullable(),
  bbox_mm: z.strictObject({ min_x: nn, min_y: nn, min_z: nn, max_x: nn, max_y: nn, max_z: nn }).nullable(),
  size_detail: z.string(),
  objects: n,
  features: z.partialRecord(z.enum([...FEATURE_KINDS, 'unlabelled']), FeatureJsonSchema),
  motion: z.strictObject({
    moves: n,
    extruding_moves: n,
    travel_moves: n,
    arcs: n,
    extruding_length_mm: nn,
    travel_length_mm: nn,
    limits: z.record(z.string(), nn),
    limits_set_by: z.array(z.string()),
  }),
  time: z.strictObject({ estimated_s: nn, commanded_s: nn, dwell_s: nn, before_first_layer_s: nn, slicer_estimate_s: nn }),
  overrides: z.strictObject({
    feed_percent_max: nn,
    feed_percent_min: nn,
    feed_max_line: nn,
    feed_min_line: nn,
    flow_percent_max: nn,
    flow_percent_min: nn,
    flow_max_line: nn,
    flow_min_line: nn,
    commands: n,
  }),
  temperatures: z.strictObject({ nozzle_max_c: nn, bed_max_c: nn, fan_max_percent: nn }),
  commands: z.strictObject({
    lines: n,
    commands: n,
    unknown_total: n,
    unknown: z.record(z.string(), n),
    checksum_errors: n,
    long_lines: n,
    tools: z.array(n),
  }),
  slicer_reports: z.strictObject({ filament_length_mm: nn, estimated_time_s: nn }),
  settings: z.strictObject(Object.fromEntries(SETTING_KEYS.map((k) => [k, SettingPairSchema])) as Record<SettingKey, typeof SettingPairSchema>),
  rules: z.array(RuleResultSchema).optional(),
  plausibility: z.array(FlagSchema).optional(),
  warnings: z.array(FlagSchema),
});

/** An inspection report as stored and served (snake_case JSON). */
export type InspectionReport = z.infer<typeof InspectionReportSchema>;
export type SettingPairJson = z.infer<typeof SettingPairSchema>;
export type RuleResultJson = z.infer<typeof RuleResultSchema>;
export type FlagJson = z.infer<typeof FlagSchema>;

/** A report that does not match the contract (a stale row, a foreign writer, a bug). */
export class ReportContractError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ReportContractError';
  }
}

/**
 * A stored report read back (a JSON column, a raw SQL row): the report when it matches the
 * contract, else null — a row that does not match is treated as having no report, never guessed at.
 */
export function readStoredReport(raw: unknown): InspectionReport | null {
  let v = raw;
  if (typeof v === 'string') {
    try {
      v = JSON.parse(v);
    } catch {
      return null;
    }
  }
  const r = InspectionReportSchema.safeParse(v);
  return r.success ? r.data : null;
}

/** Checks JSON against the contract and returns it typed; throws ReportContractError naming the first bad fields. */
export function parseInspectionReport(json: unknown): InspectionReport {
  const r = InspectionReportSchema.safeParse(json);
  if (r.success) return r.data;
  const where = r.error.issues
    .slice(0, 3)
    .map((i) => `${i.path.join('.') || '(top)'}: ${i.message}`)
    .join('; ');
  throw new ReportContractError(`The inspection report does not match the report contract (${where}).`);
}

/** What an inspection job gets back from the engine and stores: the report and, beside it, the preview. */
export interface StoredInspectionJson {
  report: InspectionReport;
  preview: ToolpathPreview | null;
}

/** Checks a job's output ({ report, preview }) against the contract; throws ReportContractError. */
export function parseStoredInspection(json: unknown): StoredInspectionJson {
  const o = (json && typeof json === 'object' ? json : {}) as { report?: unknown; preview?: unknown };
  const report = parseInspectionReport(o.report);
  if (o.preview === null || o.preview === undefined) return { report, preview: null };
  const p = ToolpathPreviewSchema.safeParse(o.preview);
  if (!p.success) throw new ReportContractError(`The toolpath preview does not match its format (${p.error.issues[0]?.path.join('.')}: ${p.error.issues[0]?.message}).`);
  return { report, preview: p.data };
}
