/**
 * The engine's report in memory (EngineReport: camelCase, full precision, for the CLI's text
 * report and the engine's own tests) and toJsonReport(), which turns it into the report contract
 * (contract.ts: snake_case, units in the key names) that everything outside the engine reads.
 */
import type { FeatureKind, Flag, SettingsEvidence } from './types';
import type { BBox, MeasureResult } from './measure';
import type { RuleResult } from './rules';
import type { InspectionReport, SettingKey, SettingPairJson } from './contract';
import type { ToolpathPreview } from './preview';

export interface SettingPairOut {
  declared: number | null;
  measured: number | null;
  detail?: string;
}

/** A layer printed with more wall loops than most (Slic3r's extra perimeters on slopes, say). */
export interface ExtraLoopLayer {
  zMm: number;
  walls: number;
}

export type ReportSettings = SettingsEvidence & {
  first_layer_height_mm: SettingPairOut;
  line_width_mm: SettingPairOut;
  walls: SettingPairOut & { extraLoopLayers?: ExtraLoopLayer[]; extraLoopLayerCount?: number };
};

export interface FeatureReport {
  feature: FeatureKind | 'unlabelled';
  extrudedLengthMm: number;
  extrudedVolumeMm3: number;
  commandedTimeS: number;
  lineWidthMm: { mean: number | null; min: number | null; max: number | null };
  speedMms: { min: number | null; max: number | null; mean: number | null };
}

export interface EngineReport {
  file: { name: string | null; bytes: number; textBytes: number; gzip: boolean; lines: number };
  slicer: { dialect: string; generator: string | null };
  filament: {
    diameterMm: number;
    areaMm2: number;
    /** Net filament of the print (prime lines in the start code left out). */
    lengthMm: number;
    /** Every millimetre of filament the file feeds, start code included. */
    totalLengthMm: number;
    preambleMm: number;
    preambleDetail: string;
    volumeMm3: number;
    massG: number | null;
    material: string;
    densityGcm3: number;
    densitySource: string;
    retractions: number;
    retractedMm: number;
  };
  flow: MeasureResult['flow'];
  layers: {
    count: number;
    heightMm: number | null;
    firstHeightMm: number | null;
    zMm: number[];
    timeS: number[];
  };
  sizeMm: { x: number; y: number; z: number } | null;
  bboxMm: BBox | null;
  sizeDetail: string;
  objects: number;
  features: FeatureReport[];
  motion: {
    moves: number;
    extrudingMoves: number;
    travelMoves: number;
    arcs: number;
    extrudingLengthMm: number;
    travelLengthMm: number;
    /** Limits the file set (null = not set; the estimate then used a default). */
    limits: Record<string, number | null>;
    limitsSetBy: string[];
  };
  time: {
    estimatedS: number;
    /** Σ length ÷ feed, no acceleration: a lower bound that ignores the machine. */
    commandedS: number;
    dwellS: number;
    beforeFirstLayerS: number;
    slicerEstimateS: number | null;
  };
  overrides: {
    feedPercentMax: number | null;
    feedPercentMin: number | null;
    /** Line of the highest / lowest speed factor. */
    feedLineNo: number | null;
    feedMinLineNo: number | null;
    flowPercentMax: number | null;
    flowPercentMin: number | null;
    flowLineNo: number | null;
    flowMinLineNo: number | null;
    commands: number;
  };
  temperatures: { nozzleMaxC: number | null; bedMaxC: number | null; fanMaxPercent: number | null };
  commands: {
    lines: number;
    commands: number;
    unknownTotal: number;
    unknown: Record<string, number>;
    checksumErrors: number;
    longLines: number;
    tools: number[];
  };
  slicerReports: { filamentLengthMm: number | null; estimatedTimeS: number | null };
  settings: ReportSettings;
  /** Results of the rulebook, when one was given. */
  rules?: RuleResult[];
  /** The judges' toolpath preview, when asked for (InspectOptions.preview); stored beside the report, not in it. */
  preview?: ToolpathPreview;
  /** Plausibility flags, when claims were given. */
  plausibility?: Flag[];
  warnings: Flag[];
}

const r3 = (v: number | null): number | null => (v === null || !Number.isFinite(v) ? null : Math.round(v * 1000) / 1000);
const r1 = (v: number | null): number | null => (v === null || !Number.isFinite(v) ? null : Math.round(v * 10) / 10);
/** A figure that is always there (0 if a hostile file made it non-finite). */
const r3f = (v: number): number => (Number.isFinite(v) ? Math.round(v * 1000) / 1000 : 0);
const r3s = (xs: number[]): number[] => xs.map((x) => (Number.isFinite(x) ? Math.round(x * 1000) / 1000 : 0));

function settingsJson(s: ReportSettings): InspectionReport['settings'] {
  const pair = (v: SettingPairOut): SettingPairJson => ({ declared: r3(v.declared), measured: r3(v.measured), ...(v.detail ? { detail: v.detail } : {}) });
  const out = Object.fromEntries((Object.entries(s) as [SettingKey, SettingPairOut][]).map(([k, v]) => [k, pair(v)])) as InspectionReport['settings'];
  if (s.walls.extraLoopLayers) {
    out.walls.extra_loop_layers = s.walls.extraLoopLayers.map((l) => ({ z_mm: r3(l.zMm) ?? 0, walls: l.walls }));
    out.walls.extra_loop_layer_count = s.walls.extraLoopLayerCount ?? s.walls.extraLoopLayers.length;
  }
  return out;
}

/** The report contract (contract.ts): snake_case JSON with units in the key names; numbers rounded for reading, never NaN. */
export function toJsonReport(r: EngineReport): InspectionReport {
  return {
    file: { name: r.file.name, bytes: r.file.bytes, text_bytes: r.file.textBytes, gzip: r.file.gzip, lines: r.file.lines },
    slicer: { dialect: r.slicer.dialect, generator: r.slicer.generator },
    filament: {
      diameter_mm: r.filament.diameterMm,
      area_mm2: r3(r.filament.areaMm2),
      length_mm: r1(r.filament.lengthMm),
      total_length_mm: r1(r.filament.totalLengthMm),
      preamble_mm: r1(r.filament.preambleMm),
      preamble_detail: r.filament.preambleDetail,
      volume_mm3: r1(r.filament.volumeMm3),
      mass_g: r3(r.filament.massG),
      material: r.filament.material,
      density_gcm3: r.filament.densityGcm3,
      density_source: r.filament.densitySource,
      retractions: r.filament.retractions,
      retracted_mm: r1(r.filament.retractedMm),
    },
    flow: {
      peak_mm3s: r3(r.flow.peakMm3s),
      peak_line: r.flow.peakLineNo,
      p95_mm3s: r3(r.flow.p95Mm3s),
      mean_mm3s: r3(r.flow.meanMm3s),
      histogram: { bin_mm3s: r.flow.histogram.binMm3s, time_s: r3s(r.flow.histogram.timeS) },
      time_series: {
        bucket_s: r.flow.timeSeries.bucketS,
        max_mm3s: r3s(r.flow.timeSeries.maxMm3s),
        mean_mm3s: r3s(r.flow.timeSeries.meanMm3s),
      },
    },
    layers: {
      count: r.layers.count,
      height_mm: r3(r.layers.heightMm),
      first_height_mm: r3(r.layers.firstHeightMm),
      z_mm: r3s(r.layers.zMm),
      time_s: r3s(r.layers.timeS),
    },
    size_mm: r.sizeMm ? { x: r3f(r.sizeMm.x), y: r3f(r.sizeMm.y), z: r3f(r.sizeMm.z) } : null,
    bbox_mm: r.bboxMm
      ? {
          min_x: r3(r.bboxMm.minX),
          min_y: r3(r.bboxMm.minY),
          min_z: r3(r.bboxMm.minZ),
          max_x: r3(r.bboxMm.maxX),
          max_y: r3(r.bboxMm.maxY),
          max_z: r3(r.bboxMm.maxZ),
        }
      : null,
    size_detail: r.sizeDetail,
    objects: r.objects,
    features: Object.fromEntries(
      r.features.map((f) => [
        f.feature,
        {
          length_mm: r1(f.extrudedLengthMm),
          volume_mm3: r1(f.extrudedVolumeMm3),
          commanded_time_s: r1(f.commandedTimeS),
          line_width_mm: { mean: r3(f.lineWidthMm.mean), min: r3(f.lineWidthMm.min), max: r3(f.lineWidthMm.max) },
          speed_mms: { min: r1(f.speedMms.min), max: r1(f.speedMms.max), mean: r1(f.speedMms.mean) },
        },
      ]),
    ),
    motion: {
      moves: r.motion.moves,
      extruding_moves: r.motion.extrudingMoves,
      travel_moves: r.motion.travelMoves,
      arcs: r.motion.arcs,
      extruding_length_mm: r1(r.motion.extrudingLengthMm),
      travel_length_mm: r1(r.motion.travelLengthMm),
      limits: Object.fromEntries(Object.entries(r.motion.limits).map(([k, v]) => [k, r3(v)])),
      limits_set_by: r.motion.limitsSetBy,
    },
    time: {
      estimated_s: r1(r.time.estimatedS),
      commanded_s: r1(r.time.commandedS),
      dwell_s: r1(r.time.dwellS),
      before_first_layer_s: r1(r.time.beforeFirstLayerS),
      slicer_estimate_s: r.time.slicerEstimateS,
    },
    overrides: {
      feed_percent_max: r.overrides.feedPercentMax,
      feed_percent_min: r.overrides.feedPercentMin,
      feed_max_line: r.overrides.feedLineNo,
      feed_min_line: r.overrides.feedMinLineNo,
      flow_percent_max: r.overrides.flowPercentMax,
      flow_percent_min: r.overrides.flowPercentMin,
      flow_max_line: r.overrides.flowLineNo,
      flow_min_line: r.overrides.flowMinLineNo,
      commands: r.overrides.commands,
    },
    temperatures: {
      nozzle_max_c: r.temperatures.nozzleMaxC,
      bed_max_c: r.temperatures.bedMaxC,
      fan_max_percent: r1(r.temperatures.fanMaxPercent),
    },
    commands: {
      lines: r.commands.lines,
      commands: r.commands.commands,
      unknown_total: r.commands.unknownTotal,
      unknown: r.commands.unknown,
      checksum_errors: r.commands.checksumErrors,
      long_lines: r.commands.longLines,
      tools: r.commands.tools,
    },
    slicer_reports: {
      filament_length_mm: r.slicerReports.filamentLengthMm,
      estimated_time_s: r.slicerReports.estimatedTimeS,
    },
    settings: settingsJson(r.settings),
    ...(r.rules ? { rules: r.rules } : {}),
    ...(r.plausibility ? { plausibility: r.plausibility } : {}),
    warnings: r.warnings,
  };
}
