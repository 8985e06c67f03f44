/**
 * An inspection as the pages show it (rule results, flags, key figures, the flow series), from its
 * row's facts and stored report. No database access: the browser's rulebook check
 * (components/GcodeCheck.tsx) builds the same view from the report it computed.
 */
import type { Inspection } from '@/models';
import type { Flag } from '@/lib/inspection/types';
import type { RuleResult } from '@/lib/inspection/rules';
import { flowSeries } from '@/lib/reviews/report';

/** The row facts inspectionJson reads. */
export type InspectionFacts = Pick<
  Inspection,
  'id' | 'status' | 'error' | 'createdAt' | 'finishedAt' | 'report' | 'blockingFailures' | 'advisoryFlags' | 'ruleResults' | 'flags' | 'peakFlowMm3s' | 'p95FlowMm3s' | 'estimatedTimeS' | 'layerHeightMm'
>;

/** Counts for the headline columns: blocking = failing blocking rules + blocking flags; advisory = the rest judges should see. */
export function countFindings(rules: RuleResult[], flags: Flag[]) {
  const blocking = rules.filter((r) => r.status === 'fail' && r.rule.severity === 'blocking').length + flags.filter((f) => f.severity === 'blocking').length;
  const advisory =
    rules.filter((r) => (r.status === 'fail' && r.rule.severity === 'advisory') || r.status === 'unknown').length + flags.filter((f) => f.severity === 'advisory').length;
  return { blocking, advisory };
}

/** The columns stored beside a finished report (headline figures for sorting, counts for the queues). */
export function reportColumns(report: Record<string, unknown>) {
  const ruleResults = (report.rules ?? []) as RuleResult[];
  const flags = [...((report.plausibility ?? []) as Flag[]), ...((report.warnings ?? []) as Flag[])];
  const { blocking, advisory } = countFindings(ruleResults, flags);
  const flow = report.flow as { peak_mm3s: number | null; p95_mm3s: number | null } | undefined;
  const time = report.time as { estimated_s: number | null } | undefined;
  const layers = report.layers as { height_mm: number | null } | undefined;
  return {
    ruleResults,
    flags,
    blockingFailures: blocking,
    advisoryFlags: advisory,
    peakFlowMm3s: flow?.peak_mm3s ?? null,
    p95FlowMm3s: flow?.p95_mm3s ?? null,
    estimatedTimeS: time?.estimated_s ?? null,
    layerHeightMm: layers?.height_mm ?? null,
  };
}

/** The page view of a report computed elsewhere (the browser's check): done, no row behind it. */
export function reportInspectionJson(report: Record<string, unknown>, at: Date) {
  return inspectionJson({ id: 0, status: 'done', error: null, createdAt: at, finishedAt: at, report, ...reportColumns(report) });
}

interface ReportShape {
  flow?: { peak_mm3s: number | null; p95_mm3s: number | null; mean_mm3s: number | null; time_series?: { bucket_s: number; max_mm3s: number[]; mean_mm3s: number[] } };
  time?: { estimated_s: number | null; slicer_estimate_s: number | null };
  layers?: { count: number; height_mm: number | null; first_height_mm: number | null };
  size_mm?: { x: number; y: number; z: number } | null;
  objects?: number;
  filament?: { length_mm: number | null; volume_mm3: number | null; mass_g: number | null; material: string };
  settings?: Record<string, { declared: number | null; measured: number | null; detail?: string }>;
  slicer?: { dialect: string; generator: string | null };
  file?: { name: string | null; bytes: number };
}

/** The stored inspection as the pages show it: rule results, flags, key figures and the flow series. */
export function inspectionJson(row: InspectionFacts) {
  const r = (row.report ?? {}) as ReportShape;
  const setting = (k: string) => r.settings?.[k] ?? null;
  return {
    id: row.id,
    status: row.status,
    error: row.error,
    createdAt: row.createdAt.toISOString(),
    finishedAt: row.finishedAt?.toISOString() ?? null,
    fileName: r.file?.name ?? null,
    blockingFailures: row.blockingFailures,
    advisoryFlags: row.advisoryFlags,
    ruleResults: row.ruleResults as RuleResult[],
    flags: row.flags as Flag[],
    figures: {
      peakFlowMm3s: row.peakFlowMm3s,
      p95FlowMm3s: row.p95FlowMm3s,
      meanFlowMm3s: r.flow?.mean_mm3s ?? null,
      estimatedTimeS: row.estimatedTimeS,
      slicerEstimateS: r.time?.slicer_estimate_s ?? null,
      layerHeightMm: row.layerHeightMm,
      firstLayerHeightMm: r.layers?.first_height_mm ?? null,
      layers: r.layers?.count ?? null,
      walls: setting('walls'),
      topLayers: setting('top_layers'),
      bottomLayers: setting('bottom_layers'),
      infillPercent: setting('infill_percent'),
      lineWidthMm: setting('line_width_mm'),
      sizeMm: r.size_mm ?? null,
      objects: r.objects ?? null,
      filamentVolumeMm3: r.filament?.volume_mm3 ?? null,
      filamentMassG: r.filament?.mass_g ?? null,
      slicer: r.slicer?.generator ?? r.slicer?.dialect ?? null,
    },
    flowSeries: r.flow?.time_series ? flowSeries(r) : null,
  };
}
export type InspectionJson = ReturnType<typeof inspectionJson>;
