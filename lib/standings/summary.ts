/** The inspection in plain words for the public entry page, and the flow series for its chart. */
import { formatDurationMs, formatDurationS } from '@/lib/format';
import { flowSeries } from '@/lib/reviews/report';
import type { InspectionReport } from '@/lib/inspection/contract';

const fmt = (v: number, digits: number) => v.toFixed(digits).replace(/\.?0+$/, '') || '0';

export interface FlowSeries {
  bucket_s: number;
  points: { t_s: number; max_mm3s: number; mean_mm3s: number }[];
}

/**
 * The report's flow time series (read by lib/reviews/report.ts flowSeries) as chart points for the
 * public API, or null when the report has none.
 */
export function flowSeriesPoints(report: InspectionReport | null): FlowSeries | null {
  const { bucketS, maxMm3s: max, meanMm3s: mean } = flowSeries(report);
  if (!max.length) return null;
  // A chart needs a few hundred points at most; merge neighbouring buckets, keeping each group's maximum.
  const step = Math.max(1, Math.ceil(max.length / 600));
  const points: FlowSeries['points'] = [];
  for (let i = 0; i < max.length; i += step) {
    let m = 0;
    let sum = 0;
    let n = 0;
    for (let j = i; j < Math.min(i + step, max.length); j++) {
      m = Math.max(m, max[j]);
      sum += mean[j] ?? 0;
      n++;
    }
    points.push({ t_s: Math.round(i * bucketS * 10) / 10, max_mm3s: m, mean_mm3s: Math.round((sum / n) * 1000) / 1000 });
  }
  return { bucket_s: bucketS * step, points };
}

/** Sentences a viewer can read without knowing the report's fields. Missing figures are left out. */
export function inspectionSummary(a: { report: InspectionReport | null; claimedTimeMs: number; rules: { pass: number; fail: number; unknown: number }; flags: number; judgedThisInspection?: boolean }): string[] {
  const r = a.report;
  const out: string[] = [];
  const count = r?.layers.count ?? null;
  const height = r?.layers.height_mm ?? null;
  const first = r?.layers.first_height_mm ?? null;
  if (count && height) out.push(`The G-code prints ${count} layers of ${fmt(height, 3)} mm${first ? ` (first layer ${fmt(first, 3)} mm)` : ''}.`);
  const peak = r?.flow.peak_mm3s ?? null;
  const p95 = r?.flow.p95_mm3s ?? null;
  const mean = r?.flow.mean_mm3s ?? null;
  if (peak != null) {
    out.push(
      `Its fastest extruding move asks the hotend for ${fmt(peak, 1)} mm³/s` +
        (p95 != null ? `; 95 % of the extruding time stays at or below ${fmt(p95, 1)} mm³/s` : '') +
        (mean != null ? `, with ${fmt(mean, 1)} mm³/s on average` : '') +
        '.',
    );
  }
  const massG = r?.filament.mass_g ?? null;
  const lengthMm = r?.filament.length_mm ?? null;
  if (lengthMm != null) out.push(`It extrudes ${fmt(lengthMm / 1000, 2)} m of filament${massG != null ? ` (about ${fmt(massG, 1)} g)` : ''}.`);
  const est = r?.time.estimated_s ?? null;
  if (est != null) {
    const claimedS = a.claimedTimeMs / 1000;
    const ratio = claimedS / est;
    out.push(
      `Hotlap estimates the file needs ${formatDurationS(est)} with acceleration; the claimed time ${formatDurationMs(a.claimedTimeMs)} is ` +
        (Math.abs(ratio - 1) < 0.005 ? 'the same.' : `${fmt(Math.abs(ratio - 1) * 100, 1)} % ${ratio < 1 ? 'shorter' : 'longer'}.`),
    );
  }
  const total = a.rules.pass + a.rules.fail + a.rules.unknown;
  if (total) {
    out.push(
      a.rules.fail === 0 && a.rules.unknown === 0
        ? `All ${total} rules of the rulebook pass.`
        : `${a.rules.pass} of ${total} rules pass${a.rules.fail ? `, ${a.rules.fail} fail` : ''}${a.rules.unknown ? `, ${a.rules.unknown} could not be measured` : ''}` +
          // Only when this inspection was finished before the decision: a later re-inspection's findings were never in front of the judges.
          (a.judgedThisInspection === false ? '.' : '; the judges weighed this before verifying.'),
    );
  }
  out.push(a.flags ? `The inspection raised ${a.flags} flag${a.flags === 1 ? '' : 's'} for the judges (listed with the verdict).` : 'The inspection raised no flags.');
  return out;
}

export interface InspectionVerdict {
  /** `pass`: every rule passes; `open`: some could not be measured; `fail`: a rule fails; `none`: no rules or no inspection */
  tone: 'pass' | 'open' | 'fail' | 'none';
  headline: string;
  flags: string;
}

/** The inspection's result in one line, for the top of the public entry page. */
export function inspectionVerdict(i: { rules: { pass: number; fail: number; unknown: number }; flags: number } | null): InspectionVerdict {
  if (!i) return { tone: 'none', headline: 'No finished inspection on record', flags: '' };
  const { pass, fail, unknown } = i.rules;
  const total = pass + fail + unknown;
  const flags = i.flags ? `${i.flags} flag${i.flags === 1 ? '' : 's'} for the judges` : 'No flags';
  if (!total) return { tone: 'none', headline: 'The G-code was inspected; this class has no rules to check', flags };
  if (fail) return { tone: 'fail', headline: `${fail} of ${total} rule${total === 1 ? '' : 's'} ${fail === 1 ? 'fails' : 'fail'}`, flags };
  if (unknown) return { tone: 'open', headline: `${pass} of ${total} rule${total === 1 ? '' : 's'} pass; ${unknown} could not be measured`, flags };
  return { tone: 'pass', headline: total === 1 ? 'The one rule passes' : `All ${total} rules pass`, flags };
}
