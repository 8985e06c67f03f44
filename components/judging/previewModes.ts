/**
 * Colour modes of the toolpath preview beyond commanded flow: commanded speed, line width and layer
 * time. Each mode maps a value to a band of a legend whose edges are rounded ("nice" steps of 1, 2,
 * 2.5 or 5 × a power of ten) and spans the values the file actually has. Pure functions: the canvas
 * view, the 3-D view and the unit tests share them.
 */
import { lineWidthMm, PROPS_AREA_PER_MM2, PROPS_SPEED_PER_MMS } from '@/lib/inspection/preview';

export const PREVIEW_MODES = {
  flow: { label: 'Commanded flow', unit: 'mm³/s' },
  speed: { label: 'Speed', unit: 'mm/s' },
  width: { label: 'Line width', unit: 'mm' },
  layerTime: { label: 'Layer time', unit: 's' },
} as const;
export type PreviewMode = keyof typeof PREVIEW_MODES;
export const PREVIEW_MODE_LIST = Object.keys(PREVIEW_MODES) as PreviewMode[];

/**
 * Our own sequential scale for speed, width and layer time: cool slate blue through coolant teal to
 * amber and ember; distinct from the flow scale's reds so a judge does not read "too hot" into it.
 */
export const BAND_COLOURS = ['#4a5d8f', '#3e7c9c', '#2f9aa6', '#2fae96', '#6cbf6a', '#b5c445', '#e3b52c', '#f08a2c', '#e0602a', '#b8401f'] as const;
/** Colour for a record or layer with no value (e.g. a prime line the report does not time). */
export const NO_VALUE_COLOUR = '#6b7280';

/** A rounded step near span/target: 1, 2, 2.5 or 5 × 10^k. */
export function niceStep(span: number, target: number): number {
  if (!(span > 0) || !(target > 0)) return 1;
  const raw = span / target;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const m = f <= 1 ? 1 : f <= 2 ? 2 : f <= 2.5 ? 2.5 : f <= 5 ? 5 : 10;
  return m * mag;
}

/** Rounds away floating-point noise (0.30000000000000004 → 0.3). */
const clean = (v: number) => Number(v.toPrecision(12));

/**
 * Band edges covering [min, max] with rounded steps, at most BAND_COLOURS.length bands. The edges
 * are lower bounds; the last band is closed at the last edge + step.
 */
export function niceBands(min: number, max: number, target = 6): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (max <= min) {
    const step = niceStep(Math.abs(min) || 1, 4);
    const lo = clean(Math.floor(min / step) * step);
    return [lo];
  }
  let step = niceStep(max - min, target);
  for (;;) {
    const edges: number[] = [];
    for (let v = Math.floor(min / step) * step; v <= max + step * 1e-9; v += step) edges.push(clean(v));
    // `max` exactly on an edge belongs to the band below it.
    if (edges.length > 1 && Math.abs(edges[edges.length - 1] - max) < step * 1e-9) edges.pop();
    if (edges.length <= BAND_COLOURS.length) return edges;
    step = niceStep(max - min, (edges.length - 1) / 2);
  }
}

/** Index of the band holding v (edges ascending), clamped to the scale. */
export function bandOf(edges: readonly number[], v: number): number {
  let i = edges.length - 1;
  while (i > 0 && v < edges[i]) i--;
  return Math.max(0, i);
}

/** The step between edges (one band's width), for labels of the last band. */
const stepOf = (edges: readonly number[]) => (edges.length > 1 ? clean(edges[1] - edges[0]) : 0);

/**
 * "40–60" style label of band i, with as many decimals as the step needs. `open` marks end bands
 * that also hold values beyond the scale (outliers clamped into them): "< 60" / "≥ 300".
 */
export function bandLabel(edges: readonly number[], i: number, open: { low?: boolean; high?: boolean } = {}): string {
  const step = stepOf(edges);
  // As many decimals as the step has (0.05 → 2, 2.5 → 1, 20 → 0).
  const decimals = Math.min(3, (String(step || 0.01).split('.')[1] ?? '').length);
  const fmt = (v: number) => v.toFixed(decimals);
  const hi = i + 1 < edges.length ? edges[i + 1] : clean(edges[i] + (step || 0));
  if (open.high && i === edges.length - 1) return `≥ ${fmt(edges[i])}`;
  if (open.low && i === 0 && edges.length > 1) return `< ${fmt(hi)}`;
  return step ? `${fmt(edges[i])}–${fmt(hi)}` : fmt(edges[i]);
}

/**
 * The range a legend spans: from the 2nd to the 98th percentile of the values, weighted (by
 * extruded length, or one per layer), so a few odd records — a purge blob, a slow first layer —
 * do not stretch the scale until every ordinary record falls in one band. Values outside are
 * drawn in the end bands, which their labels then mark as open.
 */
export function robustRange(values: readonly { v: number; w: number }[], lowQ = 0.02, highQ = 0.98): { min: number; max: number; below: boolean; above: boolean } | null {
  const xs = values.filter((x) => Number.isFinite(x.v) && x.w > 0).sort((a, b) => a.v - b.v);
  if (!xs.length) return null;
  const total = xs.reduce((t, x) => t + x.w, 0);
  const at = (q: number) => {
    let acc = 0;
    for (const x of xs) {
      acc += x.w;
      if (acc >= q * total) return x.v;
    }
    return xs[xs.length - 1].v;
  };
  const min = at(lowQ);
  const max = at(highQ);
  return { min, max, below: xs[0].v < min, above: xs[xs.length - 1].v > max };
}

export const bandColour = (i: number) => BAND_COLOURS[Math.max(0, Math.min(BAND_COLOURS.length - 1, i))];
/** Colour of band i of n, spread over the whole scale so a legend of few bands still runs cool to warm. */
export const spreadColour = (i: number, n: number) => bandColour(n <= 1 ? 0 : Math.round((i * (BAND_COLOURS.length - 1)) / (n - 1)));

/** Speed of record k of a layer's props, mm/s. */
export const recordSpeedMms = (props: readonly number[], k: number) => props[2 * k] / PROPS_SPEED_PER_MMS;
/** Line width of record k, mm, from its cross-section and the layer height (null when unknown). */
export const recordWidthMm = (props: readonly number[], k: number, heightMm: number | undefined) => lineWidthMm(props[2 * k + 1] / PROPS_AREA_PER_MM2, heightMm ?? 0);

/**
 * Per-layer commanded time from the report (planner, with acceleration), matched to the preview's
 * layers by Z (the report lists Z to 3 decimals). A preview level the report does not count (prime
 * line, purge) gets null.
 */
export function layerTimes(previewZ: readonly number[], report: { zMm: readonly number[]; timeS: readonly number[] } | null): (number | null)[] {
  if (!report?.zMm.length || report.timeS.length !== report.zMm.length) return previewZ.map(() => null);
  return previewZ.map((z) => {
    const k = report.zMm.findIndex((rz) => Math.abs(rz - z) < 0.0006);
    return k >= 0 ? report.timeS[k] : null;
  });
}
