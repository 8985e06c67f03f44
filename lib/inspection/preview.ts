/**
 * Toolpath preview: a compact top view of every printed layer, for the judges' layer viewer.
 *
 * One pass over the G-code through the engine's parser. Extruding moves are grouped by layer (the Z
 * of planar extruding moves), joined into polylines while they are connected and stay in the same
 * commanded-flow bucket, simplified (Ramer–Douglas–Peucker, perpendicular-distance tolerance), then
 * quantized to integer grid units that fit an Int16 and delta-encoded. The result is plain JSON the
 * browser decodes one layer at a time and draws on a canvas.
 *
 * Encoding of one layer (`PreviewLayer.paths`): a flat integer array of records
 *   bucket, n, x0, y0, dx1, dy1, …, dx(n-1), dy(n-1)
 * where x/y are grid units from `originMm` (unit = `unitMm`), the first point absolute and the rest
 * differences from the previous point. `bucket` indexes `flowBucketsMm3s` (lower edges, mm³/s).
 *
 * Since format 3 a layer also carries `props`: per record, in the same order, the length-weighted
 * mean commanded speed (0.1 mm/s units) and bead cross-section (µm², filament volume ÷ path length),
 * and `heightMm`, the Z step from the layer below. The viewer colours by speed and by line width
 * (`lineWidthMm`) from these; format-2 previews stay readable and offer commanded flow only.
 *
 * Built by the inspection pass itself: the PreviewCollector is one more sink of the engine's move
 * stream (InspectOptions.preview), so the preview is stored with the report and no web request
 * parses G-code. Environment-neutral (no node:* imports).
 */
import { z } from 'zod';
import type { Segment, SegmentSink } from './types';
import type { ParserOptions } from './parser';
import { filamentAreaMm2 } from './materials';

/**
 * Lower edges of the commanded-flow buckets, mm³/s. Our own scale: fine steps where desktop
 * hotends live (a stock 0.4 mm hotend is good for roughly 10–15 mm³/s, high-flow hotends reach
 * 30–50 mm³/s — common practice, no source), coarse steps above. The last bucket is open-ended.
 */
export const PREVIEW_FLOW_BUCKETS_MM3S = [0, 2, 4, 6, 8, 10, 12, 15, 18, 22, 26, 30, 35, 40, 50, 60] as const;

/** Format version of the preview JSON; bump when the encoding changes (cached previews are keyed by it). */
export const PREVIEW_VERSION = 3;
/** Older formats still read back (without the per-record speed and cross-section). */
export const PREVIEW_READABLE_VERSIONS: readonly number[] = [2, 3];
/** Polylines break where the commanded speed changes by this step, mm/s, so each keeps one speed. */
const SPEED_STEP_MMS = 5;
/** Units of `PreviewLayer.props`: speed in 0.1 mm/s, cross-section in µm² (1 mm² = 1e6 µm²). */
export const PROPS_SPEED_PER_MMS = 10;
export const PROPS_AREA_PER_MM2 = 1e6;

/**
 * Line width from the bead's cross-section and the layer height, with the rounded-rectangle bead
 * model slicers use for extrusion (a rectangle with semicircular sides: area = (w − h)·h + π·h²/4,
 * so w = area/h + h·(1 − π/4); common practice, no source). Null where the height is unknown.
 */
export function lineWidthMm(areaMm2: number, heightMm: number): number | null {
  if (!(heightMm > 0) || !(areaMm2 > 0)) return null;
  return areaMm2 / heightMm + heightMm * (1 - Math.PI / 4);
}

export interface PreviewOptions {
  filamentDiameterMm?: number;
  /** Largest perpendicular deviation allowed when simplifying a polyline, mm (default 0.05). */
  toleranceMm?: number;
  /** Grid unit for quantization, mm (default 0.01; grown automatically so the part fits an Int16). */
  unitMm?: number;
  /** Cap on the points kept over the whole file; beyond it layers are thinned and a warning says so. */
  maxPoints?: number;
  parser?: ParserOptions;
}

export interface PreviewLayer {
  zMm: number;
  /** Flat record array, see the module comment. */
  paths: number[];
  /** Extruded length on this layer, mm (before simplification). */
  extrudedMm: number;
  /** Highest commanded flow on this layer, mm³/s. */
  peakFlowMm3s: number;
  /** Format 3: per record, [speed ×10 (mm/s), cross-section (µm²)] — see the module comment. */
  props?: number[];
  /** Format 3: Z step from the layer below (the first layer: its Z), mm. */
  heightMm?: number;
}

export interface ToolpathPreview {
  version: number;
  unitMm: number;
  toleranceMm: number;
  originMm: { x: number; y: number };
  /** Extent in grid units (width, height) of all extruding moves. */
  sizeUnits: { x: number; y: number };
  /**
   * Box of the part itself in grid units: extrusion from the third layer up, which leaves out the
   * skirt, brim and prime line that slicers put on the first layer(s) and that would otherwise
   * shrink the part in a fitted view. All layers when the file has three or fewer.
   */
  focusUnits: { x0: number; y0: number; x1: number; y1: number };
  flowBucketsMm3s: readonly number[];
  /** Extruded length per flow bucket over the whole file, mm — what the legend can show beside each colour. */
  bucketLengthMm: number[];
  layers: PreviewLayer[];
  stats: { segments: number; pointsIn: number; pointsOut: number; polylines: number };
  warnings: string[];
}

const DEFAULT_TOLERANCE_MM = 0.05;
const DEFAULT_UNIT_MM = 0.01;
const INT16_MAX = 32767;
const DEFAULT_MAX_POINTS = 3_000_000;
/** Z values within 1 µm are the same layer (the engine's measurements use the same key). */
const Z_KEY_PER_MM = 1000;
/** A polyline continues when the next move starts within this distance of the last end, mm. */
const JOIN_EPS_MM = 1e-6;
/** Guard against absurd coordinates in hostile files (beyond any printer bed), mm. */
const MAX_ABS_COORD_MM = 100_000;

export function flowBucket(flowMm3s: number): number {
  const b = PREVIEW_FLOW_BUCKETS_MM3S;
  let i = b.length - 1;
  while (i > 0 && flowMm3s < b[i]) i--;
  return i;
}

interface RawPoly {
  bucket: number;
  speedKey: number;
  xy: number[];
  /** Sums for the length-weighted means: length, speed × length, cross-section × length. */
  len: number;
  speedLen: number;
  areaLen: number;
}

/** Raw polylines of one layer in mm, before quantization: bucket + flat xy list. */
interface RawLayer {
  zMm: number;
  box: [number, number, number, number];
  polys: RawPoly[];
  extrudedMm: number;
  peakFlowMm3s: number;
}

/** Collects polylines per layer from the parser's move stream. Memory grows with the points kept. */
export class PreviewCollector implements SegmentSink {
  private readonly areaMm2: number;
  private readonly maxPoints: number;
  private readonly layers: RawLayer[] = [];
  private readonly layerByKey = new Map<number, RawLayer>();
  private cur: RawLayer | null = null;
  private poly: RawPoly | null = null;
  private lastX = NaN;
  private lastY = NaN;
  private points = 0;
  private truncated = false;
  segments = 0;
  minX = Infinity;
  minY = Infinity;
  maxX = -Infinity;
  maxY = -Infinity;
  readonly bucketLengthMm = new Array<number>(PREVIEW_FLOW_BUCKETS_MM3S.length).fill(0);

  constructor(filamentDiameterMm: number, maxPoints = DEFAULT_MAX_POINTS) {
    this.areaMm2 = filamentAreaMm2(filamentDiameterMm);
    this.maxPoints = maxPoints;
  }

  segment(s: Segment): void {
    if (!s.extruding || !(s.lengthMm > 0) || !(s.feedMms > 0)) {
      // Travel or retract: the next extrusion starts a new polyline.
      this.poly = null;
      return;
    }
    if (Math.abs(s.x1) > MAX_ABS_COORD_MM || Math.abs(s.y1) > MAX_ABS_COORD_MM || Math.abs(s.x0) > MAX_ABS_COORD_MM || Math.abs(s.y0) > MAX_ABS_COORD_MM) {
      this.poly = null;
      return;
    }
    this.segments++;
    // Layer: Z of the move's end (planar moves are the norm; a Z-changing extrusion is drawn on the layer it ends in).
    const key = Math.round(s.z1 * Z_KEY_PER_MM);
    let layer = this.cur;
    if (!layer || Math.round(layer.zMm * Z_KEY_PER_MM) !== key) {
      layer = this.layerByKey.get(key) ?? null;
      if (!layer) {
        layer = { zMm: key / Z_KEY_PER_MM, box: [Infinity, Infinity, -Infinity, -Infinity], polys: [], extrudedMm: 0, peakFlowMm3s: 0 };
        this.layerByKey.set(key, layer);
        this.layers.push(layer);
      }
      this.cur = layer;
      this.poly = null;
    }
    // Commanded volumetric flow = filament volume ÷ move time, move time = length ÷ feed.
    const flowMm3s = (s.eMm * this.areaMm2 * s.feedMms) / s.lengthMm;
    const bucket = flowBucket(flowMm3s);
    const xyLen = Math.hypot(s.x1 - s.x0, s.y1 - s.y0);
    layer.extrudedMm += s.lengthMm;
    if (flowMm3s > layer.peakFlowMm3s) layer.peakFlowMm3s = flowMm3s;
    this.bucketLengthMm[bucket] += s.lengthMm;
    if (s.x0 < this.minX) this.minX = s.x0;
    if (s.x1 < this.minX) this.minX = s.x1;
    if (s.y0 < this.minY) this.minY = s.y0;
    if (s.y1 < this.minY) this.minY = s.y1;
    if (s.x0 > this.maxX) this.maxX = s.x0;
    if (s.x1 > this.maxX) this.maxX = s.x1;
    if (s.y0 > this.maxY) this.maxY = s.y0;
    if (s.y1 > this.maxY) this.maxY = s.y1;
    const b = layer.box;
    if (s.x1 < b[0]) b[0] = s.x1;
    if (s.y1 < b[1]) b[1] = s.y1;
    if (s.x1 > b[2]) b[2] = s.x1;
    if (s.y1 > b[3]) b[3] = s.y1;
    if (s.x0 < b[0]) b[0] = s.x0;
    if (s.y0 < b[1]) b[1] = s.y0;
    if (s.x0 > b[2]) b[2] = s.x0;
    if (s.y0 > b[3]) b[3] = s.y0;
    if (xyLen === 0) return; // a pure Z extrusion has nothing to show from the top
    if (this.points >= this.maxPoints) {
      this.truncated = true;
      this.poly = null;
      return;
    }
    const p = this.poly;
    const speedKey = Math.round(s.feedMms / SPEED_STEP_MMS);
    const areaMm2 = (s.eMm * this.areaMm2) / s.lengthMm;
    const joined = p !== null && p.bucket === bucket && p.speedKey === speedKey && Math.abs(s.x0 - this.lastX) < JOIN_EPS_MM && Math.abs(s.y0 - this.lastY) < JOIN_EPS_MM;
    let target: RawPoly;
    if (joined) {
      p.xy.push(s.x1, s.y1);
      this.points++;
      target = p;
    } else {
      // A bucket change keeps the polyline continuous: the new one starts where the old one ended.
      target = { bucket, speedKey, xy: [s.x0, s.y0, s.x1, s.y1], len: 0, speedLen: 0, areaLen: 0 };
      layer.polys.push(target);
      this.poly = target;
      this.points += 2;
    }
    target.len += s.lengthMm;
    target.speedLen += s.feedMms * s.lengthMm;
    target.areaLen += areaMm2 * s.lengthMm;
    this.lastX = s.x1;
    this.lastY = s.y1;
  }

  end(): void {
    this.poly = null;
  }

  result(options: { toleranceMm?: number; unitMm?: number } = {}): ToolpathPreview {
    const toleranceMm = options.toleranceMm ?? DEFAULT_TOLERANCE_MM;
    const warnings: string[] = [];
    if (this.truncated) warnings.push(`The file has more than ${this.maxPoints} path points; the preview shows the first ones only.`);
    const empty = !(this.maxX >= this.minX);
    const originX = empty ? 0 : this.minX;
    const originY = empty ? 0 : this.minY;
    const spanMm = empty ? 0 : Math.max(this.maxX - this.minX, this.maxY - this.minY);
    // Grow the unit so every absolute coordinate fits a signed 16-bit integer.
    const unitMm = Math.max(options.unitMm ?? DEFAULT_UNIT_MM, spanMm / INT16_MAX);
    if (unitMm > (options.unitMm ?? DEFAULT_UNIT_MM)) warnings.push(`The part spans ${spanMm.toFixed(1)} mm; coordinates are kept at ${unitMm.toFixed(4)} mm steps.`);
    const q = (v: number, o: number) => Math.round((v - o) / unitMm);
    let pointsIn = 0;
    let pointsOut = 0;
    let polylines = 0;
    const layers = [...this.layers].sort((a, b) => a.zMm - b.zMm);
    const out: PreviewLayer[] = layers.map((l, li) => {
      const paths: number[] = [];
      const props: number[] = [];
      for (const p of l.polys) {
        pointsIn += p.xy.length / 2;
        const simple = simplify(p.xy, toleranceMm);
        // Quantize, then drop points that collapse onto the previous grid point.
        const qs: number[] = [];
        let px = NaN;
        let py = NaN;
        for (let i = 0; i < simple.length; i += 2) {
          const x = q(simple[i], originX);
          const y = q(simple[i + 1], originY);
          if (x === px && y === py) continue;
          qs.push(x, y);
          px = x;
          py = y;
        }
        const n = qs.length / 2;
        if (n < 2) {
          // Shorter than one grid unit: keep it as a dot so tiny features still show.
          if (n === 1) qs.push(qs[0], qs[1]);
          else continue;
        }
        const m = qs.length / 2;
        paths.push(p.bucket, m, qs[0], qs[1]);
        props.push(Math.round((p.speedLen / p.len) * PROPS_SPEED_PER_MMS), Math.round((p.areaLen / p.len) * PROPS_AREA_PER_MM2));
        for (let i = 2; i < qs.length; i += 2) paths.push(qs[i] - qs[i - 2], qs[i + 1] - qs[i - 1]);
        pointsOut += m;
        polylines++;
      }
      const heightMm = round3(li > 0 ? l.zMm - layers[li - 1].zMm : l.zMm);
      return { zMm: l.zMm, paths, extrudedMm: round3(l.extrudedMm), peakFlowMm3s: round3(l.peakFlowMm3s), props, heightMm };
    });
    const focusLayers = layers.length > 3 ? layers.slice(2) : layers;
    const fb = [Infinity, Infinity, -Infinity, -Infinity];
    for (const l of focusLayers) {
      fb[0] = Math.min(fb[0], l.box[0]);
      fb[1] = Math.min(fb[1], l.box[1]);
      fb[2] = Math.max(fb[2], l.box[2]);
      fb[3] = Math.max(fb[3], l.box[3]);
    }
    const focusUnits = fb[2] >= fb[0]
      ? { x0: q(fb[0], originX), y0: q(fb[1], originY), x1: q(fb[2], originX), y1: q(fb[3], originY) }
      : { x0: 0, y0: 0, x1: 0, y1: 0 };
    return {
      version: PREVIEW_VERSION,
      unitMm,
      toleranceMm,
      originMm: { x: round3(originX), y: round3(originY) },
      sizeUnits: { x: empty ? 0 : q(this.maxX, originX), y: empty ? 0 : q(this.maxY, originY) },
      focusUnits,
      flowBucketsMm3s: PREVIEW_FLOW_BUCKETS_MM3S,
      bucketLengthMm: this.bucketLengthMm.map(round3),
      layers: out,
      stats: { segments: this.segments, pointsIn, pointsOut, polylines },
      warnings,
    };
  }
}

const round3 = (v: number) => (Number.isFinite(v) ? Math.round(v * 1000) / 1000 : 0);

/**
 * Ramer–Douglas–Peucker polyline simplification (Ramer 1972; Douglas & Peucker 1973): keeps the
 * point farthest from the chord while it is farther than the tolerance, recursively. Iterative with
 * an explicit stack so long polylines cannot overflow the call stack.
 */
export function simplify(xy: readonly number[], toleranceMm: number): number[] {
  const n = xy.length / 2;
  if (n <= 2 || !(toleranceMm > 0)) return xy.slice();
  const keep = new Uint8Array(n);
  keep[0] = 1;
  keep[n - 1] = 1;
  const tol2 = toleranceMm * toleranceMm;
  const stack: number[] = [0, n - 1];
  while (stack.length) {
    const last = stack.pop()!;
    const first = stack.pop()!;
    const ax = xy[2 * first];
    const ay = xy[2 * first + 1];
    const bx = xy[2 * last];
    const by = xy[2 * last + 1];
    const dx = bx - ax;
    const dy = by - ay;
    const len2 = dx * dx + dy * dy;
    let maxD2 = -1;
    let idx = -1;
    for (let i = first + 1; i < last; i++) {
      const px = xy[2 * i] - ax;
      const py = xy[2 * i + 1] - ay;
      let d2: number;
      if (len2 === 0) d2 = px * px + py * py;
      else {
        // Distance to the segment (not the infinite line), so a path that doubles back is kept.
        const t = Math.max(0, Math.min(1, (px * dx + py * dy) / len2));
        const ex = px - t * dx;
        const ey = py - t * dy;
        d2 = ex * ex + ey * ey;
      }
      if (d2 > maxD2) {
        maxD2 = d2;
        idx = i;
      }
    }
    if (idx >= 0 && maxD2 > tol2) {
      keep[idx] = 1;
      stack.push(first, idx, idx, last);
    }
  }
  const out: number[] = [];
  for (let i = 0; i < n; i++) if (keep[i]) out.push(xy[2 * i], xy[2 * i + 1]);
  return out;
}

/** Decodes one layer's records back to polylines in mm (for tests and for server-side checks). */
export function decodeLayer(preview: Pick<ToolpathPreview, 'unitMm' | 'originMm'>, paths: readonly number[]): { bucket: number; xyMm: number[] }[] {
  const out: { bucket: number; xyMm: number[] }[] = [];
  let i = 0;
  while (i + 1 < paths.length) {
    const bucket = paths[i];
    const n = paths[i + 1];
    i += 2;
    let x = 0;
    let y = 0;
    const xyMm: number[] = [];
    for (let k = 0; k < n && i + 1 < paths.length; k++, i += 2) {
      x = k === 0 ? paths[i] : x + paths[i];
      y = k === 0 ? paths[i + 1] : y + paths[i + 1];
      xyMm.push(preview.originMm.x + x * preview.unitMm, preview.originMm.y + y * preview.unitMm);
    }
    out.push({ bucket, xyMm });
  }
  return out;
}

const nums = z.array(z.number());

/** The stored preview (inspections.preview), checked where it is read back. */
export const ToolpathPreviewSchema = z.object({
  version: z.number().int(),
  unitMm: z.number(),
  toleranceMm: z.number(),
  originMm: z.object({ x: z.number(), y: z.number() }),
  sizeUnits: z.object({ x: z.number(), y: z.number() }),
  focusUnits: z.object({ x0: z.number(), y0: z.number(), x1: z.number(), y1: z.number() }),
  flowBucketsMm3s: nums,
  bucketLengthMm: nums,
  layers: z.array(z.object({ zMm: z.number(), paths: nums, extrudedMm: z.number(), peakFlowMm3s: z.number(), props: nums.optional(), heightMm: z.number().optional() })),
  stats: z.object({ segments: z.number(), pointsIn: z.number(), pointsOut: z.number(), polylines: z.number() }),
  warnings: z.array(z.string()),
});

/** A stored preview of a format the viewer reads (PREVIEW_READABLE_VERSIONS), or null (too old, or not a preview). */
export function parseStoredPreview(json: unknown): ToolpathPreview | null {
  const r = ToolpathPreviewSchema.safeParse(json);
  return r.success && PREVIEW_READABLE_VERSIONS.includes(r.data.version) ? r.data : null;
}
