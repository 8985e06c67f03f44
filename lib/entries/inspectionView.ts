/**
 * An inspection as the pages show it (rule results, flags, key figures, the flow series), from its
 * row's facts and stored report. No database access: the browser's rulebook check
 * (components/GcodeCheck.tsx) builds the same view from the report it computed.
 */
import type { Inspection } from '@/models';
import type { Flag } from '@/lib/inspection/types';
import type { RuleResult } from '@/lib/inspection/rules';
import type { InspectionReport, SettingKey } from '@/lib/inspection/contract';
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
export function reportColumns(report: InspectionReport) {
  const ruleResults: RuleResult[] = report.rules ?? [];
  const flags: Flag[] = [...(report.plausibility ?? []), ...report.warnings];
  const { blocking, advisory } = countFindings(ruleResults, flags);
  return {
    ruleResults,
    flags,
    blockingFailures: blocking,
    advisoryFlags: advisory,
    peakFlowMm3s: report.flow.peak_mm3s,
    p95FlowMm3s: report.flow.p95_mm3s,
    estimatedTimeS: report.time.estimated_s,
    layerHeightMm: report.layers.height_mm,
  };
}

/** The page view of a report computed elsewhere (the browser's check): done, no row behind it. */
export function reportInspectionJson(report: InspectionReport, at: Date) {
  return inspectionJson({ id: 0, status: 'done', error: null, createdAt: at, finishedAt: at, report, ...reportColumns(report) });
}

/** The stored inspection as the pages show it: rule results, flags, key figures and the flow series. */
export function inspectionJson(row: InspectionFacts) {
  const r = row.report;
  const setting = (k: SettingKey) => r?.settings[k] ?? null;
  return {
    id: row.id,
    status: row.status,
    error: row.error,
    createdAt: row.createdAt.toISOString(),
    finishedAt: row.finishedAt?.toISOString() ?? null,
    fileName: r?.file.name ?? null,
    blockingFailures: row.blockingFailures,
    advisoryFlags: row.advisoryFlags,
    ruleResults: row.ruleResults,
    flags: row.flags,
    figures: {
      peakFlowMm3s: row.peakFlowMm3s,
      p95FlowMm3s: row.p95FlowMm3s,
      meanFlowMm3s: r?.flow.mean_mm3s ?? null,
      estimatedTimeS: row.estimatedTimeS,
      slicerEstimateS: r?.time.slicer_estimate_s ?? null,
      layerHeightMm: row.layerHeightMm,
      firstLayerHeightMm: r?.layers.first_height_mm ?? null,
      layers: r?.layers.count ?? null,
      walls: setting('walls'),
      topLayers: setting('top_layers'),
      bottomLayers: setting('bottom_layers'),
      infillPercent: setting('infill_percent'),
      lineWidthMm: setting('line_width_mm'),
      sizeMm: r?.size_mm ?? null,
      objects: r?.objects ?? null,
      filamentVolumeMm3: r?.filament.volume_mm3 ?? null,
      filamentMassG: r?.filament.mass_g ?? null,
      slicer: r ? (r.slicer.generator ?? r.slicer.dialect) : null,
    },
    flowSeries: r ? flowSeries(r) : null,
  };
}
export type InspectionJson = ReturnType<typeof inspectionJson>;
