/**
 * The one list of rule metrics: every figure a rulebook rule can test, with its unit and how it is
 * read from an inspection report. The rule engine, the rulebook editor and the API all import it.
 */
import { anySettingMismatch, type SettingName } from './toolpath/mismatch';
import { scalePercent, type SizeMm } from './plausibility';
import type { SettingsEvidence, Source, Sourced } from './types';

/** A declared/measured pair as the report carries it. */
export interface SettingPair {
  declared: number | null;
  measured: number | null;
  detail?: string;
}

/**
 * What the metrics read from an inspection report: the snake_case JSON form the engine produces
 * (toJsonReport() in lib/inspection/report.ts, also what the CLI prints and the app stores).
 * Structural, so a stored report read back from the database fits as well.
 */
export interface MetricReport {
  filament?: { length_mm: number | null; volume_mm3?: number | null; mass_g?: number | null } | null;
  flow?: { peak_mm3s: number | null; p95_mm3s: number | null; mean_mm3s: number | null } | null;
  layers?: { count: number | null; height_mm: number | null; first_height_mm: number | null } | null;
  size_mm?: SizeMm | null;
  objects?: number | null;
  time?: { estimated_s: number | null } | null;
  overrides?: { feed_percent_max: number | null; flow_percent_max: number | null } | null;
  settings?: (SettingsEvidence & { first_layer_height_mm?: SettingPair; line_width_mm?: SettingPair }) | null;
}

/** Inputs a metric may need beyond the report (from the season). */
export interface MetricContext {
  testPieceSizeMm?: SizeMm;
}

export type MetricKind = 'number' | 'integer' | 'boolean';

export interface MetricDef<Id extends string = string> {
  id: Id;
  label: string;
  /** Unit shown after a value ('' for counts and booleans). */
  unit: string;
  kind: MetricKind;
  description: string;
  get(report: MetricReport, ctx?: MetricContext): Sourced<number | boolean>;
}

const unknown = (detail: string): Sourced<number | boolean> => ({ value: null, source: 'measured', detail });

function measured(value: number | null | undefined, what: string): Sourced<number | boolean> {
  return value === null || value === undefined || !Number.isFinite(value)
    ? unknown(`The report has no ${what}.`)
    : { value, source: 'measured' };
}

/** Settings figures: the toolpath measurement when there is one, else what the comment block declares. */
function setting(pair: SettingPair | undefined | null, what: string): Sourced<number | boolean> {
  if (!pair) return unknown(`The report has no ${what} evidence.`);
  if (pair.measured !== null && Number.isFinite(pair.measured)) {
    return { value: pair.measured, source: 'measured', detail: pair.detail };
  }
  if (pair.declared !== null && Number.isFinite(pair.declared)) {
    return { value: pair.declared, source: 'declared', detail: `Not measurable from the toolpaths${pair.detail ? ` (${pair.detail})` : ''}; using the declared value.` };
  }
  return unknown(`Neither the toolpaths nor the comment block gave the ${what}${pair.detail ? ` (${pair.detail})` : ''}.`);
}

function settingOf(name: SettingName) {
  return (r: MetricReport) => r.settings?.[name];
}

/** An override factor: absent means the file never changed it, i.e. 100 %. */
function override(value: number | null | undefined, command: string): Sourced<number | boolean> {
  if (value === null || value === undefined) return { value: 100, source: 'default', detail: `No ${command} in the file: 100 %.` };
  return { value, source: 'measured' };
}

function sizeAxis(axis: 'x' | 'y' | 'z') {
  return (r: MetricReport) => measured(r.size_mm ? r.size_mm[axis] : null, `${axis.toUpperCase()} size`);
}

const DEFS = [
  { id: 'infill_percent', label: 'Sparse infill', unit: '%', kind: 'number', description: 'Sparse infill density: extruded volume ÷ interior volume on sparse-infill layers (100 % = solid).', get: (r) => setting(settingOf('infill_percent')(r), 'sparse infill') },
  { id: 'walls', label: 'Walls', unit: '', kind: 'integer', description: 'Number of perimeter loops around each island on mid-height layers.', get: (r) => setting(settingOf('walls')(r), 'wall count') },
  { id: 'top_layers', label: 'Top solid layers', unit: '', kind: 'integer', description: 'Solid layers under each exposed top surface, counted where sparse infill lies below.', get: (r) => setting(settingOf('top_layers')(r), 'top solid layers') },
  { id: 'bottom_layers', label: 'Bottom solid layers', unit: '', kind: 'integer', description: 'Solid layers above the bed or over each overhang, counted where sparse infill follows.', get: (r) => setting(settingOf('bottom_layers')(r), 'bottom solid layers') },
  { id: 'layer_height_mm', label: 'Layer height', unit: 'mm', kind: 'number', description: 'Typical Z step between layers.', get: (r) => setting(settingOf('layer_height_mm')(r), 'layer height') },
  { id: 'first_layer_height_mm', label: 'First layer height', unit: 'mm', kind: 'number', description: 'Height of the first printed layer above the bed.', get: (r) => (r.settings?.first_layer_height_mm ? setting(r.settings.first_layer_height_mm, 'first layer height') : measured(r.layers?.first_height_mm, 'first layer height')) },
  { id: 'nozzle_mm', label: 'Nozzle', unit: 'mm', kind: 'number', description: 'Nozzle diameter: declared, or estimated from the wall line width.', get: (r) => setting(settingOf('nozzle_mm')(r), 'nozzle size') },
  { id: 'line_width_mm', label: 'Line width', unit: 'mm', kind: 'number', description: 'Wall line width recovered from the flow model (rectangle with round ends).', get: (r) => setting(r.settings?.line_width_mm, 'line width') },
  { id: 'peak_flow_mm3s', label: 'Peak flow', unit: 'mm³/s', kind: 'number', description: 'Highest volumetric flow commanded by any extruding move.', get: (r) => measured(r.flow?.peak_mm3s, 'peak flow') },
  { id: 'p95_flow_mm3s', label: '95th percentile flow', unit: 'mm³/s', kind: 'number', description: 'Time-weighted 95th percentile of commanded volumetric flow.', get: (r) => measured(r.flow?.p95_mm3s, '95th percentile flow') },
  { id: 'mean_flow_mm3s', label: 'Mean flow', unit: 'mm³/s', kind: 'number', description: 'Time-weighted mean volumetric flow while extruding.', get: (r) => measured(r.flow?.mean_mm3s, 'mean flow') },
  { id: 'estimated_time_s', label: 'Estimated print time', unit: 's', kind: 'number', description: 'Print time estimated with trapezoidal acceleration and cornering.', get: (r) => measured(r.time?.estimated_s, 'time estimate') },
  { id: 'filament_length_mm', label: 'Filament length', unit: 'mm', kind: 'number', description: 'Net filament extruded.', get: (r) => measured(r.filament?.length_mm, 'filament length') },
  { id: 'filament_mass_g', label: 'Filament mass', unit: 'g', kind: 'number', description: 'Filament volume × material density.', get: (r) => measured(r.filament?.mass_g, 'filament mass') },
  { id: 'layer_count', label: 'Layers', unit: '', kind: 'integer', description: 'Number of printed layers.', get: (r) => measured(r.layers?.count, 'layer count') },
  { id: 'objects', label: 'Objects', unit: '', kind: 'integer', description: 'Number of separate printed objects.', get: (r) => measured(r.objects, 'object count') },
  { id: 'size_x_mm', label: 'Size X', unit: 'mm', kind: 'number', description: 'Extent of the printed part along X.', get: sizeAxis('x') },
  { id: 'size_y_mm', label: 'Size Y', unit: 'mm', kind: 'number', description: 'Extent of the printed part along Y.', get: sizeAxis('y') },
  { id: 'size_z_mm', label: 'Size Z', unit: 'mm', kind: 'number', description: 'Height of the printed part.', get: sizeAxis('z') },
  {
    id: 'scale_percent',
    label: 'Scale',
    unit: '%',
    kind: 'number',
    description: 'Printed size against the test piece (mean of the X, Y and Z ratios).',
    get: (r, ctx) => {
      if (!ctx?.testPieceSizeMm) return unknown('The season gives no test-piece size to compare with.');
      if (!r.size_mm) return unknown('The report has no part size.');
      return measured(scalePercent(r.size_mm, ctx.testPieceSizeMm), 'scale');
    },
  },
  { id: 'feed_override_percent_max', label: 'Speed override (max)', unit: '%', kind: 'number', description: 'Highest speed factor (M220) the file sets.', get: (r) => override(r.overrides?.feed_percent_max, 'M220 speed factor') },
  { id: 'flow_override_percent_max', label: 'Flow override (max)', unit: '%', kind: 'number', description: 'Highest flow factor (M221) the file sets.', get: (r) => override(r.overrides?.flow_percent_max, 'M221 flow factor') },
  {
    id: 'settings_mismatch',
    label: 'Settings mismatch',
    unit: '',
    kind: 'boolean',
    description: 'True when the comment block and the toolpaths disagree on a setting beyond tolerance.',
    get: (r) => {
      const v = anySettingMismatch(r.settings);
      return v === null ? unknown('No setting had both a declared and a measured value.') : { value: v, source: 'measured' as Source };
    },
  },
] as const satisfies readonly MetricDef[];

export type MetricId = (typeof DEFS)[number]['id'];
export const METRICS: readonly MetricDef<MetricId>[] = DEFS;
export const METRIC_IDS = DEFS.map((d) => d.id) as [MetricId, ...MetricId[]];

const BY_ID = new Map<string, MetricDef<MetricId>>(METRICS.map((m) => [m.id, m]));

export function metricById(id: string): MetricDef<MetricId> | undefined {
  return BY_ID.get(id);
}
