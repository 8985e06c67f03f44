/**
 * A complete inspection report (the contract in lib/inspection/contract.ts) with neutral figures,
 * for tests that store or read reports without running the engine. Override what a test needs.
 */
import type { InspectionReport } from '@/lib/inspection/contract';

type DeepPartial<T> = { [K in keyof T]?: T[K] extends (infer U)[] ? U[] : T[K] extends object | null ? DeepPartial<NonNullable<T[K]>> | null : T[K] };

const pair = { declared: null, measured: null };

export function blankReport(): InspectionReport {
  return {
    file: { name: 'test.gcode', bytes: 1000, text_bytes: 1000, gzip: false, lines: 40 },
    slicer: { dialect: 'unknown', generator: null },
    filament: {
      diameter_mm: 1.75, area_mm2: 2.405, length_mm: 0, total_length_mm: 0, preamble_mm: 0, preamble_detail: '', volume_mm3: 0, mass_g: 0,
      material: 'pla', density_gcm3: 1.24, density_source: 'test', retractions: 0, retracted_mm: 0,
    },
    flow: { peak_mm3s: null, peak_line: null, p95_mm3s: null, mean_mm3s: null, histogram: { bin_mm3s: 0.5, time_s: [] }, time_series: { bucket_s: 0, max_mm3s: [], mean_mm3s: [] } },
    layers: { count: 0, height_mm: null, first_height_mm: null, z_mm: [], time_s: [] },
    size_mm: null,
    bbox_mm: null,
    size_detail: '',
    objects: 1,
    features: {},
    motion: { moves: 0, extruding_moves: 0, travel_moves: 0, arcs: 0, extruding_length_mm: 0, travel_length_mm: 0, limits: {}, limits_set_by: [] },
    time: { estimated_s: null, commanded_s: null, dwell_s: 0, before_first_layer_s: 0, slicer_estimate_s: null },
    overrides: {
      feed_percent_max: null, feed_percent_min: null, feed_max_line: null, feed_min_line: null,
      flow_percent_max: null, flow_percent_min: null, flow_max_line: null, flow_min_line: null, commands: 0,
    },
    temperatures: { nozzle_max_c: null, bed_max_c: null, fan_max_percent: null },
    commands: { lines: 40, commands: 40, unknown_total: 0, unknown: {}, checksum_errors: 0, long_lines: 0, tools: [0] },
    slicer_reports: { filament_length_mm: null, estimated_time_s: null },
    settings: {
      infill_percent: pair, walls: pair, top_layers: pair, bottom_layers: pair, layer_height_mm: pair, nozzle_mm: pair, first_layer_height_mm: pair, line_width_mm: pair,
    },
    warnings: [],
  };
}

/** blankReport() with the given blocks merged in, one level deep per block. */
export function reportWith(parts: DeepPartial<InspectionReport>): InspectionReport {
  const r = blankReport() as unknown as Record<string, unknown>;
  for (const [k, v] of Object.entries(parts)) {
    const base = r[k];
    r[k] = v && typeof v === 'object' && !Array.isArray(v) && base && typeof base === 'object' ? { ...base, ...v } : v;
  }
  return r as unknown as InspectionReport;
}
