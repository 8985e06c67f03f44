/**
 * Measurements over the parsed move stream: filament, volumetric flow, layers, line widths,
 * geometry (bounding box, separate objects), commanded speeds per feature, and the planned print
 * time (through MotionPlanner). Everything is accumulated in fixed-size structures, so memory does
 * not grow with the file (layer records grow with the layer count only, capped).
 */
import { FEATURE_KINDS, type FeatureKind, type Segment } from './types';
import type { MotionSink, MachineState } from './parser';
import { MotionPlanner, type MachineLimits, type PlannedMoveSink } from './planner';
import { filamentAreaMm2 } from './materials';
import * as C from './engineConstants';

/**
 * Line width from an extrusion cross-section A at layer height h, modelling the bead as a rectangle
 * with semicircular ends (Slic3r's flow math, doc/flow-math in the Slic3r manual: A = (w − h)·h + π(h/2)²),
 * solved for w: w = (A − π h²/4) ÷ h + h.
 */
export function lineWidthMm(crossSectionMm2: number, layerHeightMm: number): number {
  const h = layerHeightMm;
  return (crossSectionMm2 - (Math.PI * h * h) / 4) / h + h;
}

/** Inverse of lineWidthMm: A = (w − h)·h + π(h/2)² (same Slic3r flow model). */
export function crossSectionMm2(lineWidthMm: number, layerHeightMm: number): number {
  const h = layerHeightMm;
  return (lineWidthMm - h) * h + Math.PI * (h / 2) * (h / 2);
}

/** Index FEATURE_KINDS.length is "unlabelled". */
const N_FEATURES = FEATURE_KINDS.length + 1;
const FEATURE_INDEX = new Map<FeatureKind, number>(FEATURE_KINDS.map((f, i) => [f, i]));
function featureIndex(f: FeatureKind | null): number {
  return f === null ? N_FEATURES - 1 : (FEATURE_INDEX.get(f) as number);
}

// Bins, grid and caps (engineConstants.ts), as module constants (no getter call per access).
const FLOW_BIN_MM3S = C.FLOW_BIN_MM3S;
const FLOW_BINS = C.FLOW_BINS;
const TIME_SERIES_POINTS = C.TIME_SERIES_POINTS;
const GRID_CELL_MM = C.GRID_CELL_MM;
const GRID_N = C.GRID_N;
const GRID_ORIGIN_MM = C.GRID_ORIGIN_MM;
const MAX_LAYERS = C.MEASURE_MAX_LAYERS;
/** Layer index used for moves on layers beyond MAX_LAYERS (their time and count are kept in totals). */
const OVERFLOW_LAYER = MAX_LAYERS;
const WIDTH_BIN_MM = C.WIDTH_BIN_MM;
const WIDTH_BINS = C.WIDTH_BINS;
const Z_KEY_PER_MM = C.Z_KEY_PER_MM;

export interface MeasureOptions {
  filamentDiameterMm: number;
  limits?: MachineLimits;
}

export interface FeatureStats {
  feature: FeatureKind | 'unlabelled';
  extrudedLengthMm: number;
  extrudedVolumeMm3: number;
  commandedTimeS: number;
  lineWidthMeanMm: number | null;
  lineWidthMinMm: number | null;
  lineWidthMaxMm: number | null;
  speedMinMms: number | null;
  speedMaxMms: number | null;
  /** Time-weighted mean commanded speed = length ÷ Σ(length/feed). */
  speedMeanMms: number | null;
}

export interface LayerInfo {
  zMm: number;
  heightMm: number;
  timeS: number;
  volumeMm3: number;
}

export interface BBox {
  minX: number;
  minY: number;
  minZ: number;
  maxX: number;
  maxY: number;
  maxZ: number;
}

export interface MeasureResult {
  filamentAreaMm2: number;
  /** Net filament of the print proper: all filament fed minus what was fed before the first layer (prime/purge lines). */
  printFilamentMm: number;
  /** Net filament fed before the print proper began. */
  preambleFilamentMm: number;
  preambleDetail: string;
  /** All net filament fed by the file. */
  netFilamentMm: number;
  extrudedFilamentMm: number;
  retractedFilamentMm: number;
  retractions: number;
  extrudingMoves: number;
  travelMoves: number;
  extrudingLengthMm: number;
  /** Part of extrudingLengthMm on moves that change Z (not assigned to layers). */
  nonPlanarExtrudingLengthMm: number;
  travelLengthMm: number;
  flow: {
    peakMm3s: number | null;
    peakLineNo: number | null;
    p95Mm3s: number | null;
    meanMm3s: number | null;
    /** Histogram of commanded extruding time per 1 mm³/s bin (seconds), trimmed after the last non-empty bin. */
    histogram: { binMm3s: number; timeS: number[] };
    timeSeries: { bucketS: number; maxMm3s: number[]; meanMm3s: number[] };
  };
  layers: {
    count: number;
    heightMm: number | null;
    firstHeightMm: number | null;
    /** Per-layer records, at most MAX_LAYERS (count may be larger). */
    list: LayerInfo[];
    listed: number;
    overflowTimeS: number;
    beforeFirstLayerS: number;
    preambleExcluded: boolean;
  };
  bboxMm: BBox | null;
  sizeMm: { x: number; y: number; z: number } | null;
  sizeDetail: string;
  objects: number;
  features: FeatureStats[];
  labelled: boolean;
  time: { estimatedS: number; commandedS: number; dwellS: number };
}

function emptyBox(): Float64Array {
  return new Float64Array([Infinity, Infinity, Infinity, -Infinity, -Infinity, -Infinity]);
}

function growBox(b: Float64Array, s: Segment): void {
  const xa = s.x0 < s.x1 ? s.x0 : s.x1;
  const xb = s.x0 < s.x1 ? s.x1 : s.x0;
  const ya = s.y0 < s.y1 ? s.y0 : s.y1;
  const yb = s.y0 < s.y1 ? s.y1 : s.y0;
  const za = s.z0 < s.z1 ? s.z0 : s.z1;
  const zb = s.z0 < s.z1 ? s.z1 : s.z0;
  if (xa < b[0]) b[0] = xa;
  if (ya < b[1]) b[1] = ya;
  if (za < b[2]) b[2] = za;
  if (xb > b[3]) b[3] = xb;
  if (yb > b[4]) b[4] = yb;
  if (zb > b[5]) b[5] = zb;
}

function boxOrNull(b: Float64Array): BBox | null {
  if (!(b[0] <= b[3])) return null;
  return { minX: b[0], minY: b[1], minZ: b[2], maxX: b[3], maxY: b[4], maxZ: b[5] };
}

/** Grid cell bits. */
const CELL_PREAMBLE = 1;
const CELL_FIRST = 2;
const CELL_LATER = 4;

export class Measurements implements MotionSink, PlannedMoveSink {
  readonly planner: MotionPlanner;
  private readonly areaMm2: number;

  private netE = 0;
  /** Net filament fed before the first labelled extruding move / before records 0 and 1 began. */
  private eBeforeLabelled = NaN;
  private readonly eBeforeRecord = [NaN, NaN];
  private posE = 0;
  private negE = 0;
  private retractions = 0;
  private extrudingMoves = 0;
  private travelMoves = 0;
  private extrLen = 0;
  private travelLen = 0;
  private commandedS = 0;

  // Flow.
  private readonly hist = new Float64Array(FLOW_BINS + 1);
  private peakFlow = -1;
  private peakLine = 0;
  private extrudeTimeS = 0;
  private extrudeVolMm3 = 0;
  private tsBucketS = 1;
  private tsN = 0;
  private readonly tsMax = new Float64Array(TIME_SERIES_POINTS);
  private readonly tsVol = new Float64Array(TIME_SERIES_POINTS);
  private plannedT = 0;

  // Layers: records in order of first appearance.
  private readonly layerIdByKey = new Map<number, number>();
  private readonly layerZ: number[] = [];
  private readonly layerH: number[] = [];
  private readonly layerTime: number[] = [];
  private readonly layerVol: number[] = [];
  private curKey = NaN;
  private curLayer = -1;
  private maxLayerZ = 0;
  private beforeFirstS = 0;
  /** Layers beyond MAX_LAYERS: counted (new highest Z) but not listed; their planned time. */
  private overflowLayers = 0;
  private overflowS = 0;
  /** Index of the layer record that is the first of the stack (0, or 1 when record 0 was a prime line above it). */
  private stackStart = 0;
  private preambleDecided = false;

  // Features.
  private readonly fLen = new Float64Array(N_FEATURES);
  private readonly fVol = new Float64Array(N_FEATURES);
  private readonly fTime = new Float64Array(N_FEATURES);
  private readonly fWidthLen = new Float64Array(N_FEATURES);
  private readonly fWidthSum = new Float64Array(N_FEATURES);
  private readonly fWMin = new Float64Array(N_FEATURES).fill(Infinity);
  private readonly fWMax = new Float64Array(N_FEATURES).fill(-Infinity);
  private readonly fVMin = new Float64Array(N_FEATURES).fill(Infinity);
  private readonly fVMax = new Float64Array(N_FEATURES).fill(-Infinity);
  private labelledMoves = 0;
  /** Extruding length of moves that change Z (spiral / vase mode, non-planar paths). */
  private nonPlanarLen = 0;
  /** Length-weighted histogram of line widths (skirt left out), for a robust typical width. */
  private readonly widthHist = new Float64Array(WIDTH_BINS);
  private readonly widthHistSum = new Float64Array(WIDTH_BINS);
  private lastFeature: FeatureKind | null = null;
  private lastFeatureIndex = N_FEATURES - 1;

  // Geometry.
  private readonly boxLabelled = emptyBox(); // labelled, not skirt/support
  private readonly boxFirst = emptyBox(); // stack first layer, all
  private readonly boxLater = emptyBox(); // later layers, all but skirt/support labels
  private readonly boxPre = emptyBox(); // provisional record-0 box
  private readonly boxAll = emptyBox();
  private grid: Uint8Array | null = null;
  // Grid extent in cells, set from the boxes when objects are counted.
  private gMinI = 0;
  private gMinJ = 0;
  private gMaxI = -1;
  private gMaxJ = -1;

  constructor(options: MeasureOptions, machine: MachineState | null) {
    this.areaMm2 = filamentAreaMm2(options.filamentDiameterMm);
    this.planner = new MotionPlanner(this, machine, options.limits);
  }

  /** eMm of the move being processed (for the filament-before-layer bookkeeping). */
  private moveE = 0;

  segment(s: Segment): void {
    const e = s.eMm;
    this.moveE = e;
    this.netE += e;
    const L = s.lengthMm;
    const feed = s.feedMms;
    const dt = L > 0 ? L / feed : e !== 0 ? (e < 0 ? -e : e) / feed : 0;
    this.commandedS += dt;
    if (e > 0) this.posE += e;
    else if (e < 0) {
      this.negE -= e;
      this.retractions++;
    }
    let flow = 0;
    if (s.extruding) {
      if (s.feature !== null && this.eBeforeLabelled !== this.eBeforeLabelled) this.eBeforeLabelled = this.netE - e;
      this.extrudingMoves++;
      this.extrLen += L;
      const vol = e * this.areaMm2;
      flow = vol / dt;
      this.extrudeTimeS += dt;
      this.extrudeVolMm3 += vol;
      if (flow > this.peakFlow) {
        this.peakFlow = flow;
        this.peakLine = s.lineNo;
      }
      let bin = (flow / FLOW_BIN_MM3S) | 0;
      if (bin > FLOW_BINS || bin < 0) bin = FLOW_BINS;
      this.hist[bin] += dt;
      this.moveVolMm3 = vol;
      this.moveDtS = dt;
      this.extrusion(s);
    } else if (L > 0) {
      this.travelMoves++;
      this.travelLen += L;
    }
    this.planner.nextFlowMm3s = flow;
    this.planner.push(s, this.curLayer);
  }

  dwell(timeS: number): void {
    this.planner.dwell(timeS, this.curLayer);
  }

  end(): void {
    this.planner.flush();
  }

  /** Called by the planner when a move's duration is final. */
  planned(timeS: number, flowMm3s: number, layerIndex: number): void {
    if (layerIndex === OVERFLOW_LAYER) this.overflowS += timeS;
    else if (layerIndex >= 0) this.layerTime[layerIndex] += timeS;
    else this.beforeFirstS += timeS;
    // Time series bucket at the move's start time; double the bucket length when the series is full.
    // The bucket index only changes when the time passes the current bucket's end, so the division
    // is skipped for most moves (bucket lengths are powers of two: the index and end are exact).
    let b = this.tsCur;
    if (!(this.plannedT < this.tsCurEndS)) {
      b = Math.floor(this.plannedT / this.tsBucketS);
      while (b >= TIME_SERIES_POINTS) {
        this.mergeBuckets();
        b = Math.floor(this.plannedT / this.tsBucketS);
      }
      this.tsCur = b;
      this.tsCurEndS = (b + 1) * this.tsBucketS;
    }
    if (b >= this.tsN) this.tsN = b + 1;
    if (flowMm3s > this.tsMax[b]) this.tsMax[b] = flowMm3s;
    this.tsVol[b] += flowMm3s * timeS;
    this.plannedT += timeS;
  }

  /** Bucket of the current time and the time it ends (s); −Infinity end until the first move. */
  private tsCur = 0;
  private tsCurEndS = -Infinity;

  private mergeBuckets(): void {
    const half = TIME_SERIES_POINTS / 2;
    for (let i = 0; i < half; i++) {
      const a = 2 * i;
      this.tsMax[i] = Math.max(this.tsMax[a], this.tsMax[a + 1]);
      this.tsVol[i] = this.tsVol[a] + this.tsVol[a + 1];
    }
    this.tsMax.fill(0, half);
    this.tsVol.fill(0, half);
    this.tsBucketS *= 2;
    this.tsN = Math.ceil(this.tsN / 2);
    this.tsCurEndS = -Infinity;
  }

  /** Per-move figures for extrusion(), as fields so no double is boxed per call (see planner.nextFlowMm3s). */
  private moveVolMm3 = 0;
  private moveDtS = 0;

  private extrusion(s: Segment): void {
    const vol = this.moveVolMm3;
    const dt = this.moveDtS;
    const L = s.lengthMm;
    // Layer bookkeeping from planar extruding moves (works without any layer comments).
    const planar = s.z0 === s.z1;
    if (!planar) this.nonPlanarLen += L;
    if (planar) {
      const key = Math.round(s.z1 * Z_KEY_PER_MM);
      if (key !== this.curKey) this.enterLayer(key, s.z1);
    }
    const li = this.curLayer;
    if (li >= 0 && li !== OVERFLOW_LAYER) this.layerVol[li] += vol;
    if (s.feature !== this.lastFeature) {
      this.lastFeature = s.feature;
      this.lastFeatureIndex = featureIndex(s.feature);
    }
    const fi = this.lastFeatureIndex;
    if (s.feature !== null) this.labelledMoves++;
    this.fLen[fi] += L;
    this.fVol[fi] += vol;
    this.fTime[fi] += dt;
    const v = s.feedMms;
    if (v < this.fVMin[fi]) this.fVMin[fi] = v;
    if (v > this.fVMax[fi]) this.fVMax[fi] = v;
    if (li >= 0 && li !== OVERFLOW_LAYER && planar) {
      const h = this.layerH[li];
      if (h > 0) {
        const w = lineWidthMm(vol / L, h);
        if (w > 0 && w < 50) {
          this.fWidthSum[fi] += w * L;
          this.fWidthLen[fi] += L;
          if (w < this.fWMin[fi]) this.fWMin[fi] = w;
          if (w > this.fWMax[fi]) this.fWMax[fi] = w;
          if (s.feature !== 'skirt') {
            let b = (w / WIDTH_BIN_MM) | 0;
            if (b >= WIDTH_BINS) b = WIDTH_BINS - 1;
            this.widthHist[b] += L;
            this.widthHistSum[b] += w * L;
          }
        }
      }
    }
    // Geometry.
    growBox(this.boxAll, s);
    const f = s.feature;
    const excluded = f === 'skirt' || f === 'support';
    if (f !== null && !excluded) growBox(this.boxLabelled, s);
    if (excluded || li < 0) return;
    let bit: number;
    if (!this.preambleDecided && li === 0) {
      bit = CELL_PREAMBLE;
      growBox(this.boxPre, s);
    } else if (li === this.stackStart) {
      bit = CELL_FIRST;
      growBox(this.boxFirst, s);
    } else {
      bit = CELL_LATER;
      growBox(this.boxLater, s);
    }
    this.mark(s, bit);
  }

  private enterLayer(key: number, z: number): void {
    this.curKey = key;
    const id = this.layerIdByKey.get(key);
    if (id !== undefined) {
      this.curLayer = id;
      return;
    }
    if (this.layerZ.length >= MAX_LAYERS) {
      // Past the cap: keep counting layers (each new highest Z) without per-layer records.
      if (z > this.maxLayerZ) {
        this.overflowLayers++;
        this.maxLayerZ = z;
      }
      this.curLayer = OVERFLOW_LAYER;
      return;
    }
    const n = this.layerZ.length;
    if (n < 2) this.eBeforeRecord[n] = this.netE - this.moveE;
    if (n === 1 && !this.preambleDecided) {
      // Record 0 was a prime/purge line when the print proper starts below it (slicers prime at
      // a Z above the first layer, then move down); otherwise record 0 is the first layer.
      this.preambleDecided = true;
      if (z < this.layerZ[0]) {
        this.stackStart = 1;
        // A later layer at the prime line's Z is a real layer: let it get its own record.
        this.layerIdByKey.delete(Math.round(this.layerZ[0] * Z_KEY_PER_MM));
      } else {
        this.stackStart = 0;
        // The provisional record-0 contributions belong to the first layer.
        mergeBox(this.boxFirst, this.boxPre);
        if (this.grid) for (let i = 0; i < this.grid.length; i++) if (this.grid[i] & CELL_PREAMBLE) this.grid[i] |= CELL_FIRST;
      }
    }
    let h: number;
    if (n === 0 || n === this.stackStart) h = z;
    else if (z > this.maxLayerZ) h = z - this.maxLayerZ;
    else h = this.layerH[n - 1];
    if (n === 0 || n === this.stackStart || z > this.maxLayerZ) this.maxLayerZ = z;
    this.layerIdByKey.set(key, n);
    this.layerZ.push(z);
    this.layerH.push(h);
    this.layerTime.push(0);
    this.layerVol.push(0);
    this.curLayer = n;
  }

  /**
   * Marks the 1 mm grid cells an extruding move passes through, sampled once per cell length: the
   * cells of consecutive samples touch at least at a corner, so 8-neighbour groups stay connected.
   */
  private mark(s: Segment, bit: number): void {
    let g = this.grid;
    if (g === null) g = this.grid = new Uint8Array(GRID_N * GRID_N);
    const inv = 1 / GRID_CELL_MM;
    const x0 = (s.x0 - GRID_ORIGIN_MM) * inv;
    const y0 = (s.y0 - GRID_ORIGIN_MM) * inv;
    const x1 = (s.x1 - GRID_ORIGIN_MM) * inv;
    const y1 = (s.y1 - GRID_ORIGIN_MM) * inv;
    const n = Math.ceil(s.lengthMm * inv) | 0;
    const dx = n > 0 ? (x1 - x0) / n : 0;
    const dy = n > 0 ? (y1 - y0) / n : 0;
    // Both ends inside the grid: no clamping in the loop, and truncation is floor for positives.
    const inside = x0 >= 0 && y0 >= 0 && x1 >= 0 && y1 >= 0 && x0 < GRID_N && x1 < GRID_N && y0 < GRID_N && y1 < GRID_N;
    // Two loops rather than a test per sample (an extruding move averages ~7 samples). Marking a
    // cell again is harmless, so the inside loop does not track the previous cell.
    if (inside) {
      for (let k = 0; k <= n; k++) g[((y0 + dy * k) | 0) * GRID_N + ((x0 + dx * k) | 0)] |= bit;
      return;
    }
    for (let k = 0; k <= n; k++) {
      const i = Math.min(GRID_N - 1, Math.max(0, Math.floor(x0 + dx * k)));
      const j = Math.min(GRID_N - 1, Math.max(0, Math.floor(y0 + dy * k)));
      g[j * GRID_N + i] |= bit;
    }
  }

  /** Connected groups (8-neighbour) of grid cells with any of the given bits. */
  private countObjects(bits: number): number {
    const g = this.grid;
    if (!g || this.gMaxI < 0) return 0;
    const w = this.gMaxI - this.gMinI + 1;
    const h = this.gMaxJ - this.gMinJ + 1;
    const seen = new Uint8Array(w * h);
    const stack = new Int32Array(w * h);
    let count = 0;
    for (let j = 0; j < h; j++) {
      for (let i = 0; i < w; i++) {
        const li = j * w + i;
        if (seen[li] || !(g[(j + this.gMinJ) * GRID_N + i + this.gMinI] & bits)) continue;
        count++;
        let sp = 0;
        stack[sp++] = li;
        seen[li] = 1;
        while (sp > 0) {
          const c = stack[--sp];
          const ci = c % w;
          const cj = (c - ci) / w;
          for (let dj = -1; dj <= 1; dj++) {
            const nj = cj + dj;
            if (nj < 0 || nj >= h) continue;
            for (let di = -1; di <= 1; di++) {
              const ni = ci + di;
              if (ni < 0 || ni >= w) continue;
              const nl = nj * w + ni;
              if (seen[nl] || !(g[(nj + this.gMinJ) * GRID_N + ni + this.gMinI] & bits)) continue;
              seen[nl] = 1;
              stack[sp++] = nl;
            }
          }
        }
      }
    }
    return count;
  }

  /** Length-weighted median line width (mean width inside the median 0.005 mm bin), or null without planar extrusion. */
  private medianWidthMm(): number | null {
    const total = sum(this.widthHist);
    if (!(total > 0)) return null;
    let acc = 0;
    for (let b = 0; b < WIDTH_BINS; b++) {
      acc += this.widthHist[b];
      if (acc >= total / 2) return this.widthHistSum[b] / this.widthHist[b];
    }
    return null;
  }

  result(): MeasureResult {
    const area = this.areaMm2;
    // Flow percentiles from the time-weighted histogram.
    let p95: number | null = null;
    const total = this.extrudeTimeS;
    if (total > 0) {
      const target = total * 0.95;
      let acc = 0;
      for (let b = 0; b <= FLOW_BINS; b++) {
        const w = this.hist[b];
        if (acc + w >= target && w > 0) {
          const frac = (target - acc) / w;
          p95 = b === FLOW_BINS ? this.peakFlow : (b + frac) * FLOW_BIN_MM3S;
          break;
        }
        acc += w;
      }
      if (p95 !== null && p95 > this.peakFlow) p95 = this.peakFlow;
    }
    // Compact 1 mm³/s histogram for charts.
    const coarse: number[] = [];
    const per = Math.round(1 / FLOW_BIN_MM3S);
    for (let b = 0; b <= FLOW_BINS; b++) {
      const c = Math.floor(b / per);
      while (coarse.length <= c) coarse.push(0);
      coarse[c] += this.hist[b];
    }
    while (coarse.length > 0 && coarse[coarse.length - 1] === 0) coarse.pop();

    const tsN = this.tsN;
    const bucket = this.tsBucketS;
    const tsMax: number[] = [];
    const tsMean: number[] = [];
    for (let i = 0; i < tsN; i++) {
      tsMax.push(this.tsMax[i]);
      tsMean.push(this.tsVol[i] / bucket);
    }

    // Layers of the stack (a prime line above the first layer is left out).
    const start = this.stackStart;
    const list: LayerInfo[] = [];
    for (let i = start; i < this.layerZ.length; i++) {
      list.push({ zMm: this.layerZ[i], heightMm: this.layerH[i], timeS: this.layerTime[i], volumeMm3: this.layerVol[i] });
    }
    let preS = this.beforeFirstS;
    for (let i = 0; i < start; i++) preS += this.layerTime[i];
    const zs = list.map((l) => l.zMm).sort((a, b) => a - b);
    let heightMm: number | null = null;
    if (zs.length >= 2) {
      // Mode of the Z steps between consecutive printed layers (µm resolution).
      const counts = new Map<number, number>();
      for (let i = 1; i < zs.length; i++) {
        const d = Math.round((zs[i] - zs[i - 1]) * 1000);
        if (d > 0) counts.set(d, (counts.get(d) ?? 0) + 1);
      }
      let best = 0;
      let bestN = 0;
      for (const [d, n] of counts) if (n > bestN || (n === bestN && d < best)) [best, bestN] = [d, n];
      heightMm = bestN > 0 ? best / 1000 : null;
    }
    const firstHeightMm = zs.length > 0 ? zs[0] : null;

    // Geometry: labelled files use labelled non-skirt moves; otherwise layers above the first
    // (a skirt or brim is on the first layer only), or the first layer when there is just one.
    const labelled = this.labelledMoves > 0;
    const hasLater = this.layerZ.length - start > 1;
    let box: BBox | null;
    let sizeDetail: string;
    if (labelled) {
      box = boxOrNull(this.boxLabelled);
      sizeDetail = 'from extruding moves labelled by the slicer, skirt, brim and support left out';
    } else if (hasLater) {
      const b = boxOrNull(this.boxLater);
      const first = boxOrNull(this.preambleDecided ? this.boxFirst : this.boxPre);
      box = b && first ? { ...b, minZ: Math.min(b.minZ, first.minZ) } : b;
      sizeDetail = 'from extruding moves above the first layer (no feature labels; skirt and brim are first-layer only)';
    } else {
      box = boxOrNull(this.preambleDecided ? this.boxFirst : this.boxPre) ?? boxOrNull(this.boxAll);
      sizeDetail = 'from the only printed layer';
    }
    const features: FeatureStats[] = [];
    for (let i = 0; i < N_FEATURES; i++) {
      if (this.fLen[i] === 0) continue;
      features.push({
        feature: i < FEATURE_KINDS.length ? FEATURE_KINDS[i] : 'unlabelled',
        extrudedLengthMm: this.fLen[i],
        extrudedVolumeMm3: this.fVol[i],
        commandedTimeS: this.fTime[i],
        lineWidthMeanMm: this.fWidthLen[i] > 0 ? this.fWidthSum[i] / this.fWidthLen[i] : null,
        lineWidthMinMm: this.fWidthLen[i] > 0 ? this.fWMin[i] : null,
        lineWidthMaxMm: this.fWidthLen[i] > 0 ? this.fWMax[i] : null,
        speedMinMms: this.fVMin[i],
        speedMaxMms: this.fVMax[i],
        speedMeanMms: this.fTime[i] > 0 ? this.fLen[i] / this.fTime[i] : null,
      });
    }
    // Extrusion centre lines sit half a line width inside the part's edge: add one outer line width.
    let edgeW: number | null = null;
    const ow = features.find((f) => f.feature === 'outer-wall');
    if (ow && ow.lineWidthMeanMm !== null) edgeW = ow.lineWidthMeanMm;
    else edgeW = this.medianWidthMm();
    let sizeMm: { x: number; y: number; z: number } | null = null;
    if (box) {
      const wAdd = edgeW ?? 0;
      sizeMm = { x: box.maxX - box.minX + wAdd, y: box.maxY - box.minY + wAdd, z: box.maxZ };
      sizeDetail += edgeW !== null ? `; X/Y include one ${edgeW.toFixed(3)} mm line width (centre line to edge on both sides)` : '';
    }
    let objects = 0;
    const ext = emptyBox();
    mergeBox(ext, this.boxPre);
    mergeBox(ext, this.boxFirst);
    mergeBox(ext, this.boxLater);
    if (this.grid && ext[0] <= ext[3]) {
      const cell = (v: number) => Math.min(GRID_N - 1, Math.max(0, Math.floor((v - GRID_ORIGIN_MM) / GRID_CELL_MM)));
      this.gMinI = cell(ext[0]);
      this.gMinJ = cell(ext[1]);
      this.gMaxI = cell(ext[3]);
      this.gMaxJ = cell(ext[4]);
      const bits = hasLater ? CELL_LATER : this.preambleDecided ? CELL_FIRST : CELL_PREAMBLE | CELL_FIRST;
      objects = this.countObjects(bits);
    }
    // Filament fed before the print proper (prime lines in the start code): before the first
    // labelled move when the slicer labels features, else before the first layer of the stack.
    let pre = 0;
    let preambleDetail: string;
    if (labelled && this.eBeforeLabelled === this.eBeforeLabelled) {
      pre = this.eBeforeLabelled;
      preambleDetail = 'filament fed before the first move the slicer labelled as part of the print';
    } else if (this.eBeforeRecord[start] === this.eBeforeRecord[start]) {
      pre = this.eBeforeRecord[start];
      preambleDetail = start > 0 ? 'filament fed before the first layer (a prime line above the first layer was found)' : 'filament fed before the first layer';
    } else preambleDetail = 'no extrusion';
    return {
      filamentAreaMm2: area,
      printFilamentMm: this.netE - pre,
      preambleFilamentMm: pre,
      preambleDetail,
      netFilamentMm: this.netE,
      extrudedFilamentMm: this.posE,
      retractedFilamentMm: this.negE,
      retractions: this.retractions,
      extrudingMoves: this.extrudingMoves,
      travelMoves: this.travelMoves,
      extrudingLengthMm: this.extrLen,
      nonPlanarExtrudingLengthMm: this.nonPlanarLen,
      travelLengthMm: this.travelLen,
      flow: {
        peakMm3s: this.peakFlow >= 0 ? this.peakFlow : null,
        peakLineNo: this.peakFlow >= 0 ? this.peakLine : null,
        p95Mm3s: p95,
        meanMm3s: total > 0 ? this.extrudeVolMm3 / total : null,
        histogram: { binMm3s: 1, timeS: coarse },
        timeSeries: { bucketS: bucket, maxMm3s: tsMax, meanMm3s: tsMean },
      },
      layers: {
        count: list.length + this.overflowLayers,
        listed: list.length,
        overflowTimeS: this.overflowS,
        heightMm,
        firstHeightMm,
        list,
        beforeFirstLayerS: preS,
        preambleExcluded: start > 0,
      },
      bboxMm: box,
      sizeMm,
      sizeDetail,
      objects,
      features,
      labelled,
      time: { estimatedS: this.planner.totalS, commandedS: this.commandedS, dwellS: this.planner.dwellS },
    };
  }
}

function sum(xs: Float64Array): number {
  let t = 0;
  for (let i = 0; i < xs.length; i++) t += xs[i];
  return t;
}

function mergeBox(into: Float64Array, from: Float64Array): void {
  for (let i = 0; i < 3; i++) if (from[i] < into[i]) into[i] = from[i];
  for (let i = 3; i < 6; i++) if (from[i] > into[i]) into[i] = from[i];
}
