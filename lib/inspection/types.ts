/**
 * Shared contract of the inspection engine.
 *
 * The engine is framework-free: nothing under lib/inspection imports Next.js, React or Sequelize.
 * Data flows one way:
 *
 *   bytes (.gcode / .gcode.gz) ──reader──▶ lines ──parser──▶ Segment + comment callbacks ──▶ analyzers ──▶ InspectionReport
 *
 * The parser resolves units (G20/G21), distance modes (G90/G91, M82/M83), G92 offsets, arcs (split
 * into short chords), firmware retraction and the M220/M221 factors, so analyzers only ever see
 * absolute millimetres and net filament per move.
 */

/** Every feature label, in the order reports list them (one list: FeatureKind is derived from it). */
export const FEATURE_KINDS = [
  'outer-wall',
  'inner-wall',
  'overhang-wall',
  'sparse-infill',
  'solid-infill',
  'top-solid',
  'bottom-solid',
  'bridge',
  'skirt',
  'support',
  'gap-fill',
  'other',
] as const;

/** Feature label recovered from slicer annotations (";TYPE:…", ";FEATURE:…"); null when the file has none. */
export type FeatureKind = (typeof FEATURE_KINDS)[number];

/**
 * One straight move after all modal state is resolved. The parser hands the SAME object to every
 * callback (it is overwritten on the next move), so a consumer copies the fields it wants to keep.
 */
export interface Segment {
  x0: number;
  y0: number;
  z0: number;
  x1: number;
  y1: number;
  z1: number;
  /** XYZ length of the move, mm. */
  lengthMm: number;
  /** Net filament fed during the move in mm of filament (negative = retract), flow factor applied. */
  eMm: number;
  /** Commanded feed in mm/s with the speed factor (M220) applied. */
  feedMms: number;
  /** True when eMm > 0 and the move has XY/Z length (a printing move, not a retract or travel). */
  extruding: boolean;
  feature: FeatureKind | null;
  /** Active tool (T0, T1…). */
  tool: number;
  /** 1-based line number in the file. */
  lineNo: number;
}

/** Consumer of the parsed stream. All methods are optional except segment. */
export interface SegmentSink {
  segment(s: Segment): void;
  /** Text after ';' (or inside parentheses), without the delimiter, trimmed. */
  comment?(text: string, lineNo: number): void;
  /** Called once when the stream ends. */
  end?(): void;
}

/** Where a figure came from. */
export type Source = 'declared' | 'measured' | 'claimed' | 'option' | 'default';

/** A figure with its provenance, used for settings and rule inputs. */
export interface Sourced<T> {
  value: T | null;
  source: Source;
  /** Human note: which comment key, which layers, why unknown… */
  detail?: string;
}

/** Settings a contest rulebook cares about. Declared = slicer comment block; measured = toolpaths. */
export interface SettingsEvidence {
  infill_percent: { declared: number | null; measured: number | null; detail?: string };
  walls: { declared: number | null; measured: number | null; detail?: string };
  top_layers: { declared: number | null; measured: number | null; detail?: string };
  bottom_layers: { declared: number | null; measured: number | null; detail?: string };
  layer_height_mm: { declared: number | null; measured: number | null; detail?: string };
  nozzle_mm: { declared: number | null; measured: number | null; detail?: string };
}

/** A warning or plausibility flag in the report. */
export interface Flag {
  code: string;
  severity: 'info' | 'advisory' | 'blocking';
  message: string;
}
