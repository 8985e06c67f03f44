/**
 * Round axis ticks for every chart: steps of 1, 2 or 5 × 10ⁿ (Heckbert, "Nice numbers for graph
 * labels", Graphics Gems, 1990), durations in clock steps (seconds, minutes, hours), dates in whole
 * days or weeks. Charts pass these ticks explicitly with `interval={0}`, so recharts neither drops
 * a label nor invents an odd one; the count is kept small enough that labels do not overlap.
 * Pure and framework-free: used by the browser charts and by server code alike.
 */

/** A round step near `raw`: 1, 2 or 5 × 10ⁿ. */
export function niceStep(raw: number): number {
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const exp = Math.floor(Math.log10(raw));
  const f = raw / 10 ** exp;
  const nice = f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10;
  return nice * 10 ** exp;
}

export interface Axis {
  /** [first tick, last tick]: the domain to give the axis, so the ends carry labels. */
  domain: [number, number];
  ticks: number[];
  step: number;
}

/** Removes float noise (0.30000000000000004 → 0.3) at the step's precision. */
const clean = (v: number, step: number) => {
  const digits = Math.max(0, -Math.floor(Math.log10(step)) + 1);
  return Number(v.toFixed(Math.min(12, digits)));
};

function ticksWith(min: number, max: number, step: number): Axis {
  const lo = Math.floor(min / step + 1e-9) * step;
  const hi = Math.ceil(max / step - 1e-9) * step;
  const ticks: number[] = [];
  for (let v = lo; v <= hi + step / 2; v += step) ticks.push(clean(v, step));
  return { domain: [ticks[0], ticks[ticks.length - 1]], ticks, step };
}

function spread(min: number, max: number): [number, number] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [0, 1];
  if (min > max) [min, max] = [max, min];
  if (min === max) return min === 0 ? [0, 1] : [min - Math.abs(min) * 0.1, max + Math.abs(max) * 0.1];
  return [min, max];
}

/**
 * About `target` round ticks covering [min, max] (at most target + 2). `integer` keeps steps whole
 * (counts of entries).
 */
export function niceTicks(min: number, max: number, target = 5, opts: { integer?: boolean } = {}): Axis {
  const [a, b] = spread(min, max);
  let step = niceStep((b - a) / Math.max(1, target));
  if (opts.integer) step = Math.max(1, Math.round(step));
  return ticksWith(a, b, step);
}

/** Clock steps for durations in seconds: 1, 2, 5, 10, 15, 30 s; 1, 2, 5, 10, 15, 30 min; 1, 2, 3, 6, 12 h. */
const TIME_STEPS_S = [1, 2, 5, 10, 15, 30, 60, 120, 300, 600, 900, 1800, 3600, 7200, 10800, 21600, 43200];

/** About `target` ticks at clock-round durations (seconds) covering [min, max]. */
export function niceTimeTicks(minS: number, maxS: number, target = 5): Axis {
  const [a, b] = spread(minS, maxS);
  const raw = (b - a) / Math.max(1, target);
  const step = TIME_STEPS_S.find((s) => s >= raw) ?? Math.ceil(raw / 86400) * 86400;
  return ticksWith(a, b, step);
}

const DAY_MS = 86_400_000;
const DAY_STEPS = [1, 2, 7, 14, 28, 91, 182, 364];

/** About `target` ticks at whole UTC days (ms timestamps) covering [min, max]. */
export function niceDayTicks(minMs: number, maxMs: number, target = 6): Axis {
  const [a, b] = spread(minMs, maxMs);
  const raw = (b - a) / DAY_MS / Math.max(1, target);
  const step = (DAY_STEPS.find((s) => s >= raw) ?? Math.ceil(raw / 364) * 364) * DAY_MS;
  return ticksWith(Math.floor(a / DAY_MS) * DAY_MS, b, step);
}
