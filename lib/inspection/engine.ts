/**
 * The inspection engine's core, environment-neutral: bytes → lines → parser → analyzers
 * (measurements + time planner, declared settings, toolpath settings, optional preview) →
 * EngineReport, in one pass with flat memory. No node:* imports: the same code runs in Node
 * (inspect.ts feeds it from files and streams, zlib for gzip) and in a browser Web Worker (a File
 * stream, DecompressionStream for gzip).
 *
 *   const inspector = createInspector({ rules, name: 'part.gcode' });
 *   for (const chunk of chunks) inspector.push(chunk);   // decompressed bytes, any chunk sizes
 *   const report = inspector.end();                       // throws InspectionError for bad input
 */
import type { Flag, Segment, SegmentSink } from './types';
import { emptyError, LineSplitter } from './lines';
import { GcodeParser, MachineState, type MotionSink, type ParserOptions, type ParserStats, type ParserWarning } from './parser';
import { Measurements, type MeasureResult } from './measure';
import { DEFAULT_LIMITS, type MachineLimits } from './planner';
import { createDeclaredSettingsReader, type DeclaredSettings, type DeclaredSettingsReader } from './declared';
import { DEFAULT_MATERIAL_FAMILY, MATERIALS, type MaterialFamily } from './materials';
import { toJsonReport, type EngineReport, type ReportSettings } from './report';
import type { InspectionReport, StoredInspectionJson } from './contract';
import { PreviewCollector, type PreviewOptions } from './preview';
import { createToolpathSettingsAnalyzer, type MeasuredSettings, type ToolpathSettingsAnalyzer } from './toolpathSettings';
import { evaluateRules, settingsMismatchFlags, type Rule } from './rules';
import type { MetricContext } from './metrics';
import { checkPlausibility, type PlausibilityClaims } from './plausibility';

export interface InspectOptions {
  /** Filament diameter, mm (default 1.75). */
  filamentDiameterMm?: number;
  /** Material family for the mass; default: what the file declares, else PLA. */
  material?: MaterialFamily;
  /** Machine limits for the time estimate where the file sets none. */
  limits?: Partial<MachineLimits>;
  parser?: ParserOptions;
  /** Name shown in the report (default: the file's base name). */
  name?: string;
  /** Extra consumers of the move stream; their result() is the caller's business. */
  sinks?: SegmentSink[];
  /** Rulebook to evaluate against the report. */
  rules?: readonly Rule[];
  /** Season context for rule metrics (test-piece size). */
  ruleContext?: MetricContext;
  /** Entrant's claims for the plausibility checks. */
  claims?: PlausibilityClaims;
  /** Skip the toolpath settings analysis (faster; settings.*.measured stay null except layer heights). */
  skipToolpathSettings?: boolean;
  /** Build the judges' toolpath preview in the same pass (EngineReport.preview). */
  preview?: boolean | Omit<PreviewOptions, 'filamentDiameterMm' | 'parser'>;
}

/** What an inspection job keeps: the report contract, and the preview beside it (its own column). */
export type StoredInspection = StoredInspectionJson;

/** Splits an engine report into what is stored: the contract JSON and the preview. */
export function toStoredInspection(r: EngineReport): StoredInspection {
  return { report: toJsonReport(r), preview: r.preview ?? null };
}

/**
 * Fans the parsed stream out to the measurements, the toolpath analyzer and any other sinks. The
 * two analyzers are called through their own fields rather than a loop over an array of sinks: a
 * call site that sees one receiver type stays monomorphic and inlinable (the loop's call site cost
 * 75 ms self time per 100 MB of G-code in the CPU profile).
 */
class Fanout implements MotionSink {
  private readonly main: Measurements;
  private readonly toolpath: ToolpathSettingsAnalyzer | null;
  private readonly others: SegmentSink[];
  private readonly commentSinks: SegmentSink[];
  private readonly declared: DeclaredSettingsReader;
  constructor(main: Measurements, toolpath: ToolpathSettingsAnalyzer | null, declared: DeclaredSettingsReader, others: SegmentSink[]) {
    this.main = main;
    this.toolpath = toolpath;
    this.declared = declared;
    this.others = others;
    this.commentSinks = others.filter((s) => typeof s.comment === 'function');
  }
  segment(s: Segment): void {
    this.main.segment(s);
    if (this.toolpath !== null) this.toolpath.segment(s);
    const o = this.others;
    for (let i = 0; i < o.length; i++) o[i].segment(s);
  }
  comment(text: string, lineNo: number): void {
    this.declared.comment(text, lineNo);
    const c = this.commentSinks;
    for (let i = 0; i < c.length; i++) c[i].comment!(text, lineNo);
  }
  dwell(timeS: number): void {
    this.main.dwell(timeS);
  }
  end(): void {
    this.main.end();
    this.toolpath?.end?.();
    for (const o of this.others) o.end?.();
  }
}

export const DEFAULT_FILAMENT_DIAMETER_MM = 1.75;

/** Layers with extra wall loops listed in the report (the count says how many there are in all). */
export const EXTRA_LOOP_LAYERS_LISTED = 200;

/** What the per-move stages hand to the report. */
interface EngineOutput {
  stats: ParserStats;
  warnings: ParserWarning[];
  machine: MachineState;
  measure: MeasureResult;
  toolpath: MeasuredSettings | null;
}

interface RunContext {
  declared: DeclaredSettingsReader;
  diameterMm: number;
}

/** Byte counts for the report's `file` block. */
interface ReportInput {
  bytesIn: number;
  bytesText: number;
  gzip: boolean;
}

/** Where the input came from, as the caller knows it (the inspector only sees decompressed bytes). */
export interface InspectorSource {
  /** Bytes of the input as stored (compressed size for gzip); default: the bytes pushed. */
  bytesIn?: number;
  gzip?: boolean;
}

/** One inspection in progress, fed with the input's (decompressed) bytes. */
export interface Inspector {
  /** Takes the next bytes; throws InspectionError at once for binary input. The chunk may be reused after. */
  push(chunk: Uint8Array): void;
  /** Bytes pushed so far (for progress). */
  readonly bytes: number;
  /** Ends the input and returns the report contract (what is stored and served); throws InspectionError for an empty input. */
  end(source?: InspectorSource): InspectionReport;
  /** Ends the input and returns the engine's full-precision report (with the preview when asked). */
  finish(source?: InspectorSource): EngineReport;
}

/** Starts an inspection; push the input's bytes, then end(). Throws RangeError for implausible options. */
export function createInspector(options: InspectOptions = {}): Inspector {
  const diameterMm = options.filamentDiameterMm ?? DEFAULT_FILAMENT_DIAMETER_MM;
  if (!(diameterMm > 0 && diameterMm < 10)) throw new RangeError(`Filament diameter ${diameterMm} mm is not plausible (expected e.g. 1.75 or 2.85).`);
  const limits: MachineLimits = { ...DEFAULT_LIMITS, ...(options.limits ?? {}) };
  const declared = createDeclaredSettingsReader();
  const machine = new MachineState();
  const measure = new Measurements({ filamentDiameterMm: diameterMm, limits }, machine);
  const toolpath = options.skipToolpathSettings ? null : createToolpathSettingsAnalyzer({ filamentDiameterMm: diameterMm });
  const previewOptions = options.preview ? (options.preview === true ? {} : options.preview) : null;
  const preview = previewOptions ? new PreviewCollector(diameterMm, previewOptions.maxPoints) : null;
  const fan = new Fanout(measure, toolpath, declared, preview ? [...(options.sinks ?? []), preview] : (options.sinks ?? []));
  const parser = new GcodeParser(fan, options.parser ?? {}, machine);
  const splitter = new LineSplitter(parser);
  let ended = false;
  const finish = (source: InspectorSource = {}): EngineReport => {
    if (ended) throw new Error('This inspection has ended; start a new one.');
    ended = true;
    if (splitter.bytes === 0) throw emptyError();
    splitter.end();
    parser.end();
    const out: EngineOutput = { stats: parser.stats, warnings: parser.warnings, machine, measure: measure.result(), toolpath: toolpath ? toolpath.result() : null };
    const input: ReportInput = { bytesIn: source.bytesIn ?? splitter.bytes, bytesText: splitter.bytes, gzip: source.gzip ?? false };
    const report = buildReport({ declared, diameterMm }, out, input, options, options.name ?? null);
    if (preview && previewOptions) report.preview = preview.result(previewOptions);
    return report;
  };
  return {
    push(chunk: Uint8Array): void {
      if (ended) throw new Error('This inspection has ended; start a new one.');
      splitter.push(chunk);
    },
    get bytes() {
      return splitter.bytes;
    },
    end: (source?: InspectorSource): InspectionReport => toJsonReport(finish(source)),
    finish,
  };
}

function pair(declared: number | null | undefined, measured: number | null | undefined, detail?: string) {
  return { declared: declared ?? null, measured: measured ?? null, ...(detail ? { detail } : {}) };
}

function buildReport(p: RunContext, out: EngineOutput, stats: ReportInput, options: InspectOptions, name: string | null): EngineReport {
  const m: MeasureResult = out.measure;
  const ps = out.stats;
  const d: DeclaredSettings = p.declared.result();
  const warnings: Flag[] = [];

  const family: MaterialFamily = options.material ?? d.values.material_family.value ?? DEFAULT_MATERIAL_FAMILY;
  const mat = MATERIALS[family] ?? MATERIALS.other;
  const volumeMm3 = m.printFilamentMm * m.filamentAreaMm2;
  // mm³ → cm³ is ÷ 1000; mass (g) = cm³ × g/cm³.
  const massG = (volumeMm3 / 1000) * mat.densityGcm3;
  if (!options.material && d.values.material_family.value === null) {
    warnings.push({ code: 'material_assumed', severity: 'info', message: `No material given or declared: the mass assumes ${mat.label} (${mat.densityGcm3} g/cm³).` });
  }
  const declaredDia = d.values.filament_diameter_mm.value;
  if (options.filamentDiameterMm === undefined && declaredDia !== null && Math.abs(declaredDia - p.diameterMm) > 0.05) {
    warnings.push({
      code: 'filament_diameter_differs',
      severity: 'advisory',
      message: `The file declares ${declaredDia} mm filament but volumes were computed for ${p.diameterMm} mm; run again with the filament diameter option set to ${declaredDia}.`,
    });
  }
  for (const w of out.warnings) warnings.push({ code: w.code, severity: 'info', message: w.message });
  const hidden = ps.warningsTotal - out.warnings.length;
  if (hidden > 0) warnings.push({ code: 'more_warnings', severity: 'info', message: `${hidden} more parser warnings of the same kinds were not listed.` });
  if (ps.unknownCommandCount > 0) {
    const top = [...ps.unknownCommands.entries()].sort((a, b) => b[1] - a[1]).slice(0, 8).map(([k, n]) => `${k} ×${n}`);
    warnings.push({ code: 'unknown_commands', severity: 'info', message: `${ps.unknownCommandCount} commands were not recognised and had no effect on the figures: ${top.join(', ')}.` });
  }
  if (m.extrudingMoves === 0) {
    warnings.push({ code: 'no_extrusion', severity: 'blocking', message: 'The file has no extruding moves: nothing would be printed, so no flow, layers or size can be measured.' });
  }
  if (ps.speedFactor.max && ps.speedFactor.max.percent !== 100) {
    warnings.push({ code: 'speed_override', severity: 'advisory', message: `The file sets a speed factor (M220) of up to ${ps.speedFactor.max.percent} % (line ${ps.speedFactor.max.lineNo}); the figures include it.` });
  }
  if (ps.flowFactor.max && (ps.flowFactor.max.percent !== 100 || (ps.flowFactor.min && ps.flowFactor.min.percent !== 100))) {
    warnings.push({ code: 'flow_override', severity: 'advisory', message: `The file sets a flow factor (M221) between ${ps.flowFactor.min?.percent} % and ${ps.flowFactor.max.percent} % (line ${ps.flowFactor.max.lineNo}); the figures include it.` });
  }
  if (m.extrudingLengthMm > 0 && m.nonPlanarExtrudingLengthMm > 0.2 * m.extrudingLengthMm) {
    warnings.push({
      code: 'non_planar_extrusion',
      severity: 'advisory',
      message: `${((m.nonPlanarExtrudingLengthMm / m.extrudingLengthMm) * 100).toFixed(0)} % of the extrusion climbs in Z (spiral or vase mode?): layers are counted only where the nozzle prints at a constant height.`,
    });
  }
  if (m.layers.count > m.layers.listed) {
    warnings.push({
      code: 'layers_not_listed',
      severity: 'info',
      message: `The file has ${m.layers.count} layers; per-layer times are listed for the first ${m.layers.listed} only (the totals include all).`,
    });
  }
  if (ps.toolsUsed.size > 1) {
    warnings.push({ code: 'several_tools', severity: 'info', message: `The file uses ${ps.toolsUsed.size} tools; filament is summed over all of them.` });
  }

  const settings = settingsEvidence(d, out.toolpath, m);
  if (out.toolpath) {
    for (const w of out.toolpath.warnings) warnings.push({ code: 'toolpath_settings', severity: 'info', message: w });
  }
  warnings.push(...settingsMismatchFlags(settings));

  const mach = out.machine;
  const report: EngineReport = {
    file: { name, bytes: stats.bytesIn, textBytes: stats.bytesText, gzip: stats.gzip, lines: ps.lines },
    slicer: { dialect: d.dialect, generator: d.generator },
    filament: {
      diameterMm: p.diameterMm,
      areaMm2: m.filamentAreaMm2,
      lengthMm: m.printFilamentMm,
      totalLengthMm: m.netFilamentMm,
      preambleMm: m.preambleFilamentMm,
      preambleDetail: m.preambleDetail,
      volumeMm3,
      massG,
      material: family,
      densityGcm3: mat.densityGcm3,
      densitySource: mat.densitySource,
      retractions: m.retractions,
      retractedMm: m.retractedFilamentMm,
    },
    flow: m.flow,
    layers: {
      count: m.layers.count,
      heightMm: m.layers.heightMm,
      firstHeightMm: m.layers.firstHeightMm,
      zMm: m.layers.list.map((l) => l.zMm),
      timeS: m.layers.list.map((l) => l.timeS),
    },
    sizeMm: m.sizeMm,
    bboxMm: m.bboxMm,
    sizeDetail: m.sizeDetail,
    objects: m.objects,
    features: m.features.map((f) => ({
      feature: f.feature,
      extrudedLengthMm: f.extrudedLengthMm,
      extrudedVolumeMm3: f.extrudedVolumeMm3,
      commandedTimeS: f.commandedTimeS,
      lineWidthMm: { mean: f.lineWidthMeanMm, min: f.lineWidthMinMm, max: f.lineWidthMaxMm },
      speedMms: { min: f.speedMinMms, max: f.speedMaxMms, mean: f.speedMeanMms },
    })),
    motion: {
      moves: ps.moves,
      extrudingMoves: m.extrudingMoves,
      travelMoves: m.travelMoves,
      arcs: ps.arcs,
      extrudingLengthMm: m.extrudingLengthMm,
      travelLengthMm: m.travelLengthMm,
      limits: {
        accel_print_mms2: mach.accelPrintMms2,
        accel_travel_mms2: mach.accelTravelMms2,
        accel_retract_mms2: mach.accelRetractMms2,
        jerk_x_mms: mach.jerkXMms,
        jerk_y_mms: mach.jerkYMms,
        junction_deviation_mm: mach.junctionDeviationMm,
        square_corner_velocity_mms: mach.squareCornerVelocityMms,
        max_feed_x_mms: mach.maxFeedXMms,
        max_feed_y_mms: mach.maxFeedYMms,
        max_feed_z_mms: mach.maxFeedZMms,
        max_feed_e_mms: mach.maxFeedEMms,
        max_velocity_mms: mach.maxVelocityMms,
        max_accel_x_mms2: mach.maxAccelXMms2,
        max_accel_y_mms2: mach.maxAccelYMms2,
      },
      limitsSetBy: [...mach.setBy],
    },
    time: {
      estimatedS: m.time.estimatedS,
      commandedS: m.time.commandedS,
      dwellS: m.time.dwellS,
      beforeFirstLayerS: m.layers.beforeFirstLayerS,
      slicerEstimateS: d.reported.estimated_time_s.value,
    },
    overrides: {
      feedPercentMax: ps.speedFactor.max?.percent ?? null,
      feedPercentMin: ps.speedFactor.min?.percent ?? null,
      feedLineNo: ps.speedFactor.max?.lineNo ?? null,
      feedMinLineNo: ps.speedFactor.min?.lineNo ?? null,
      flowPercentMax: ps.flowFactor.max?.percent ?? null,
      flowPercentMin: ps.flowFactor.min?.percent ?? null,
      flowLineNo: ps.flowFactor.max?.lineNo ?? null,
      flowMinLineNo: ps.flowFactor.min?.lineNo ?? null,
      commands: ps.speedFactor.count + ps.flowFactor.count,
    },
    temperatures: { nozzleMaxC: ps.nozzleTempMaxC, bedMaxC: ps.bedTempMaxC, fanMaxPercent: ps.fanMaxPercent },
    commands: {
      lines: ps.lines,
      commands: ps.commands,
      unknownTotal: ps.unknownCommandCount,
      unknown: Object.fromEntries(ps.unknownCommands),
      checksumErrors: ps.checksumErrors,
      longLines: ps.longLines,
      tools: [...ps.toolsUsed].sort((a, b) => a - b),
    },
    slicerReports: {
      filamentLengthMm: d.reported.filament_length_mm.value,
      estimatedTimeS: d.reported.estimated_time_s.value,
    },
    settings,
    warnings,
  };
  if (options.rules || options.claims) {
    const json = toJsonReport(report);
    if (options.rules) report.rules = evaluateRules(options.rules, json, options.ruleContext);
    if (options.claims) report.plausibility = checkPlausibility(json, options.claims);
  }
  return report;
}

/**
 * Declared (comment block) and measured (toolpaths) settings side by side. The toolpath analyzer
 * measures them from geometry alone; where it has no figure, the engine's own layer measurements
 * fill the layer heights and the flow-model wall width fills the line width.
 */
function settingsEvidence(d: DeclaredSettings, t: MeasuredSettings | null, m: MeasureResult): ReportSettings {
  const outer = m.features.find((f) => f.feature === 'outer-wall');
  const inner = m.features.find((f) => f.feature === 'inner-wall');
  const wallWidth = outer?.lineWidthMeanMm ?? inner?.lineWidthMeanMm ?? null;
  const none = 'toolpath settings analysis was not run';
  type FigureKey = 'walls' | 'top_layers' | 'bottom_layers' | 'infill_percent' | 'layer_height_mm' | 'first_layer_height_mm' | 'line_width_mm' | 'nozzle_mm';
  const fig = (key: FigureKey) =>
    t ? { value: t[key].value, detail: t[key].detail } : { value: null, detail: none };
  const v = d.values;
  const lh = fig('layer_height_mm');
  const flh = fig('first_layer_height_mm');
  const lw = fig('line_width_mm');
  return {
    infill_percent: pair(v.infill_percent.value, fig('infill_percent').value, fig('infill_percent').detail),
    walls: {
      ...pair(v.walls.value, fig('walls').value, fig('walls').detail),
      ...(t && t.walls.value !== null
        ? { extraLoopLayers: t.extraLoopLayers.slice(0, EXTRA_LOOP_LAYERS_LISTED), extraLoopLayerCount: t.extraLoopLayers.length }
        : {}),
    },
    top_layers: pair(v.top_layers.value, fig('top_layers').value, fig('top_layers').detail),
    bottom_layers: pair(v.bottom_layers.value, fig('bottom_layers').value, fig('bottom_layers').detail),
    layer_height_mm:
      lh.value !== null ? pair(v.layer_height_mm.value, lh.value, lh.detail) : pair(v.layer_height_mm.value, m.layers.heightMm, 'most common Z step between printed layers'),
    nozzle_mm: pair(v.nozzle_mm.value, fig('nozzle_mm').value, fig('nozzle_mm').detail),
    first_layer_height_mm:
      flh.value !== null ? pair(v.first_layer_height_mm.value, flh.value, flh.detail) : pair(v.first_layer_height_mm.value, m.layers.firstHeightMm, 'Z of the lowest printed layer'),
    line_width_mm:
      lw.value !== null ? pair(v.line_width_mm.value, lw.value, lw.detail) : pair(v.line_width_mm.value, wallWidth, outer ? 'outer wall, flow model' : 'walls, flow model'),
  };
}
