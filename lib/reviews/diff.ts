/**
 * What changed between two inspections of the same entry (after an engine or rulebook change and a
 * re-inspection): headline figures, rule results and flags. Inspections are never overwritten, so
 * the latest two rows are compared.
 */
import { asFlags } from './flags';
import { RuleSchema, ruleSentence } from '@/lib/inspection/rules';
import { metricById, type MetricId } from '@/lib/inspection/metrics';

/** The rule's own sentence ("Walls must be 2."), without the pass/fail wording of the result. */
function sentenceOf(rule: unknown, fallback: string): string {
  const parsed = RuleSchema.safeParse(rule);
  return parsed.success ? ruleSentence(parsed.data) : fallback;
}

export interface InspectionSnapshot {
  id: number;
  engineVersion: string;
  createdAt: Date;
  blockingFailures: number;
  advisoryFlags: number;
  peakFlowMm3s: number | null;
  p95FlowMm3s: number | null;
  estimatedTimeS: number | null;
  layerHeightMm: number | null;
  ruleResults: unknown[];
  flags: unknown[];
}

/** A headline column labelled as its rule metric is, so the figure has one name everywhere. */
function metricField<K extends keyof InspectionSnapshot>(key: K, id: MetricId) {
  const m = metricById(id)!;
  return { key, label: m.label, unit: m.unit };
}

export const HEADLINE_FIELDS = [
  metricField('estimatedTimeS', 'estimated_time_s'),
  metricField('peakFlowMm3s', 'peak_flow_mm3s'),
  metricField('p95FlowMm3s', 'p95_flow_mm3s'),
  metricField('layerHeightMm', 'layer_height_mm'),
  { key: 'blockingFailures', label: 'Blocking failures', unit: '' },
  { key: 'advisoryFlags', label: 'Advisory flags', unit: '' },
] as const;

export interface RuleRow {
  metric: string;
  sentence: string;
  severity: string;
  status: string;
  measured: unknown;
}

/** Stored rule results keyed by metric and its n-th rule (`walls#0`), so a rule is compared with its earlier self. */
export function ruleRows(v: unknown): Map<string, RuleRow> {
  const out = new Map<string, RuleRow>();
  const seen = new Map<string, number>();
  for (const r of Array.isArray(v) ? v : []) {
    const rr = r as { rule?: { metric?: string; sentence?: string; severity?: string }; status?: string; measured?: unknown; message?: string };
    const metric = rr.rule?.metric;
    if (!metric) continue;
    // Key by metric and its n-th rule, so a rule whose threshold changed is compared with its old self.
    const n = seen.get(metric) ?? 0;
    seen.set(metric, n + 1);
    out.set(`${metric}#${n}`, { metric, sentence: sentenceOf(rr.rule, rr.message || metric), severity: String(rr.rule?.severity ?? 'advisory'), status: String(rr.status ?? 'unknown'), measured: rr.measured ?? null });
  }
  return out;
}

export function inspectionDiff(previous: InspectionSnapshot, latest: InspectionSnapshot) {
  const headline = HEADLINE_FIELDS.map((f) => {
    const before = previous[f.key];
    const after = latest[f.key];
    return { ...f, before, after, changed: before !== after && !(before !== null && after !== null && Math.abs(before - after) < 1e-9) };
  }).filter((h) => h.changed);
  const a = ruleRows(previous.ruleResults);
  const b = ruleRows(latest.ruleResults);
  const rules: { metric: string; sentence: string; sentenceBefore: string | null; before: string | null; after: string | null; measuredBefore: unknown; measuredAfter: unknown }[] = [];
  for (const key of new Set([...a.keys(), ...b.keys()])) {
    const x = a.get(key);
    const y = b.get(key);
    if (x && y && x.status === y.status && x.measured === y.measured && x.sentence === y.sentence) continue;
    rules.push({ metric: (y ?? x)!.metric, sentence: (y ?? x)!.sentence, sentenceBefore: x && x.sentence !== y?.sentence ? x.sentence : null, before: x?.status ?? null, after: y?.status ?? null, measuredBefore: x?.measured ?? null, measuredAfter: y?.measured ?? null });
  }
  const fa = new Set(asFlags(previous.flags).map((f) => f.code));
  const fb = asFlags(latest.flags);
  const fbCodes = new Set(fb.map((f) => f.code));
  const flagsAdded = fb.filter((f) => !fa.has(f.code));
  const flagsRemoved = [...fa].filter((c) => !fbCodes.has(c));
  return {
    previous: { id: previous.id, engineVersion: previous.engineVersion, createdAt: previous.createdAt.toISOString() },
    latest: { id: latest.id, engineVersion: latest.engineVersion, createdAt: latest.createdAt.toISOString() },
    headline,
    rules,
    flagsAdded,
    flagsRemoved,
    unchanged: headline.length === 0 && rules.length === 0 && flagsAdded.length === 0 && flagsRemoved.length === 0,
  };
}
export type InspectionDiff = ReturnType<typeof inspectionDiff>;

