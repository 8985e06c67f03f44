/** Axis settings every chart shares: small tick labels, the explicit round ticks, and no label dropped. */
import type { Axis } from '@/lib/charts/niceTicks';

export const TICK = { fontSize: 11 } as const;

/** Props for a numeric recharts axis from a nice-ticks result: every tick shown (interval 0). */
export const axisProps = (a: Axis) => ({ type: 'number' as const, domain: a.domain, ticks: a.ticks, interval: 0 as const, allowDataOverflow: false, tick: TICK });

/** Formats a number at the precision of the axis step (0.5 → "0.5", 20 → "20"). */
export function tickFormat(step: number): (v: number) => string {
  const digits = Math.max(0, Math.min(3, -Math.floor(Math.log10(step))));
  return (v: number) => v.toFixed(digits);
}
