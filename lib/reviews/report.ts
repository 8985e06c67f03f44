/**
 * Figures the review desk and the public pages take from a stored inspection report. The report
 * has one shape, the contract in lib/inspection/contract.ts, so these are plain reads.
 */
import type { InspectionReport, SettingKey, SettingPairJson } from '@/lib/inspection/contract';
import { SETTINGS_TOLERANCES, settingDisagrees, type SettingName } from '@/lib/inspection/toolpath/mismatch';

/**
 * Flow over print time for the chart (components/charts/FlowChart): fixed time buckets, peak and mean,
 * mm³/s. The one reader of flow.time_series; lib/standings/summary.ts thins it for the public API.
 */
export function flowSeries(report: InspectionReport | null): { bucketS: number; maxMm3s: number[]; meanMm3s: number[] } {
  const t = report?.flow.time_series;
  if (!t || !(t.bucket_s > 0)) return { bucketS: 1, maxMm3s: [], meanMm3s: [] };
  return { bucketS: t.bucket_s, maxMm3s: t.max_mm3s, meanMm3s: t.mean_mm3s };
}

export interface SettingRow {
  key: string;
  declared: number | null;
  measured: number | null;
  detail: string | null;
  /** Walls only: layers printed with more loops than the count most layers have. */
  extraLoopLayers?: { zMm: number; walls: number }[];
  extraLoopLayerCount?: number;
}

const SETTING_LABELS: Record<SettingKey, string> = {
  infill_percent: 'Sparse infill, %',
  walls: 'Walls',
  top_layers: 'Top solid layers',
  bottom_layers: 'Bottom solid layers',
  layer_height_mm: 'Layer height, mm',
  nozzle_mm: 'Nozzle, mm',
  first_layer_height_mm: 'First layer height, mm',
  line_width_mm: 'Line width, mm',
};

/** A report's setting key as a person reads it: "layer_height_mm" → "Layer height, mm". */
export function settingLabel(key: string): string {
  return SETTING_LABELS[key as SettingKey] ?? key.replace(/_/g, ' ');
}

/**
 * True when declared and measured differ beyond the inspection's own tolerance for that setting (the
 * same test that raises a settings-mismatch flag); settings without a tolerance are never marked.
 */
export function settingOutOfTolerance(row: Pick<SettingRow, 'key' | 'declared' | 'measured'>): boolean {
  if (!(row.key in SETTINGS_TOLERANCES)) return false;
  return settingDisagrees(row.key as SettingName, row.declared, row.measured);
}

export function settingsRows(report: InspectionReport | null): SettingRow[] {
  if (!report) return [];
  return (Object.entries(report.settings) as [string, SettingPairJson][]).map(([key, v]) => ({
    key,
    declared: v.declared,
    measured: v.measured,
    detail: v.detail ?? null,
    ...(v.extra_loop_layers?.length
      ? { extraLoopLayers: v.extra_loop_layers.map((l) => ({ zMm: l.z_mm, walls: l.walls })), extraLoopLayerCount: v.extra_loop_layer_count ?? v.extra_loop_layers.length }
      : {}),
  }));
}

export function headline(report: InspectionReport | null) {
  return {
    estimatedS: report?.time.estimated_s ?? null,
    commandedS: report?.time.commanded_s ?? null,
    slicerEstimateS: report?.time.slicer_estimate_s ?? null,
    peakFlowMm3s: report?.flow.peak_mm3s ?? null,
    p95FlowMm3s: report?.flow.p95_mm3s ?? null,
    meanFlowMm3s: report?.flow.mean_mm3s ?? null,
    layers: report?.layers.count ?? null,
    layerZMm: report?.layers.z_mm ?? [],
    /** Planner time per layer of layerZMm, s (same order, same length). */
    layerTimeS: report?.layers.time_s ?? [],
    layerHeightMm: report?.layers.height_mm ?? null,
    volumeMm3: report?.filament.volume_mm3 ?? null,
    massG: report?.filament.mass_g ?? null,
    filamentDiameterMm: report?.filament.diameter_mm ?? null,
    sizeMm: report?.size_mm ?? null,
    slicer: report?.slicer.generator ?? null,
  };
}
