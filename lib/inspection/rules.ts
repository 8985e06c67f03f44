/**
 * Rulebook rules as data: a metric, a comparator, a value (and tolerance), a severity.
 * The schema is shared by the rulebook editor, the API and the CLI (`--rules rules.json`).
 */
import { z } from 'zod';
import { METRIC_IDS, metricById, type MetricContext, type MetricDef, type MetricId, type MetricReport } from './metrics';
import type { Source } from './types';

export { settingsMismatchFlags, SETTINGS_TOLERANCES } from './toolpath/mismatch';

export const COMPARATORS = ['lt', 'lte', 'eq', 'gte', 'gt', 'between', 'ne'] as const;
export type Comparator = (typeof COMPARATORS)[number];

export const MAX_RULES = 200;

const finiteNumber = (what: string) =>
  z
    .number({ error: (iss) => (iss.input === undefined ? `${what} is required.` : `${what} must be a number (got ${JSON.stringify(iss.input)}).`) })
    .refine(Number.isFinite, { message: `${what} must be a finite number.` });

export const RuleSchema = z
  .object({
    id: z.string().min(1).max(64).optional(),
    metric: z.enum(METRIC_IDS, { error: (iss) => `Unknown metric ${JSON.stringify(iss.input)}; choose one of: ${METRIC_IDS.join(', ')}.` }),
    comparator: z.enum(COMPARATORS, { error: (iss) => `Unknown comparator ${JSON.stringify(iss.input)}; use one of: ${COMPARATORS.join(', ')}.` }),
    value: finiteNumber('The rule value'),
    valueMax: finiteNumber('The upper value').optional(),
    tolerance: finiteNumber('The tolerance').refine((t) => t >= 0, { message: 'The tolerance cannot be negative.' }).optional(),
    severity: z.enum(['blocking', 'advisory'], { error: () => 'Severity must be "blocking" or "advisory".' }),
    sentence: z.string().max(300).optional(),
  })
  .superRefine((rule, ctx) => {
    if (rule.comparator === 'between') {
      if (rule.valueMax === undefined) ctx.addIssue({ code: 'custom', path: ['valueMax'], message: 'A "between" rule needs an upper value (valueMax).' });
      else if (rule.valueMax < rule.value) ctx.addIssue({ code: 'custom', path: ['valueMax'], message: 'The upper value must not be below the lower value.' });
    }
    const metric = metricById(rule.metric);
    if (metric?.kind === 'boolean' && !(rule.value === 0 || rule.value === 1)) {
      ctx.addIssue({ code: 'custom', path: ['value'], message: `${metric.label} is yes/no: use value 1 (yes) or 0 (no).` });
    }
  });

export type Rule = z.infer<typeof RuleSchema>;

export const RulebookSchema = z.array(RuleSchema).max(MAX_RULES, { message: `A rulebook holds at most ${MAX_RULES} rules.` });
export type Rulebook = z.infer<typeof RulebookSchema>;

export type RuleStatus = 'pass' | 'fail' | 'unknown';

export interface RuleResult {
  rule: Rule;
  status: RuleStatus;
  measured: number | boolean | null;
  source: Source | null;
  message: string;
}

/** Float noise allowance at comparator edges (0.1 + 0.2 ≠ 0.3). */
const EPS = 1e-9;

/**
 * Does `m` satisfy the rule? The tolerance widens every comparison in the entrant's favour:
 * lt/gt stay strict at the widened bound, lte/gte/eq/between include it. EPS keeps float noise
 * (0.1 + 0.2 vs 0.3) from deciding an edge.
 */
export function compare(rule: Pick<Rule, 'comparator' | 'value' | 'valueMax' | 'tolerance'>, m: number): boolean {
  const t = rule.tolerance ?? 0;
  const v = rule.value;
  switch (rule.comparator) {
    case 'lt':
      return m < v + t - EPS;
    case 'lte':
      return m <= v + t + EPS;
    case 'eq':
      return Math.abs(m - v) <= t + EPS;
    case 'ne':
      return Math.abs(m - v) > t + EPS;
    case 'gte':
      return m >= v - t - EPS;
    case 'gt':
      return m > v - t + EPS;
    case 'between':
      return m >= v - t - EPS && m <= (rule.valueMax ?? v) + t + EPS;
  }
}

function decimals(v: number): number {
  const s = String(v);
  const i = s.indexOf('.');
  return i < 0 ? 0 : Math.min(4, s.length - i - 1);
}

/** A value as the rulebook shows it: mm with at least two decimals, counts as integers. */
export function formatMetricValue(metric: MetricDef, v: number | boolean): string {
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (metric.kind === 'integer') return String(Math.round(v));
  const d = metric.unit === 'mm' ? Math.max(2, decimals(v)) : Math.min(2, decimals(v));
  const text = v.toFixed(d);
  return metric.unit ? `${text} ${metric.unit}` : text;
}

function bare(metric: MetricDef, v: number): string {
  if (metric.kind === 'integer') return String(Math.round(v));
  return v.toFixed(metric.unit === 'mm' ? Math.max(2, decimals(v)) : Math.min(2, decimals(v)));
}

/** Plain English for a rule, e.g. "Sparse infill must be 15 % (± 1 %)." */
export function ruleSentence(rule: Rule): string {
  if (rule.sentence) return rule.sentence;
  const metric = metricById(rule.metric);
  if (!metric) return `Unknown metric ${rule.metric}.`;
  if (metric.kind === 'boolean') {
    const yes = rule.comparator === 'ne' ? rule.value !== 1 : rule.value === 1;
    return `${metric.label} must be ${yes ? 'yes' : 'no'}.`;
  }
  const unit = metric.unit ? ` ${metric.unit}` : '';
  const v = bare(metric, rule.value);
  let phrase: string;
  switch (rule.comparator) {
    case 'lt':
      phrase = `less than ${v}${unit}`;
      break;
    case 'lte':
      phrase = `at most ${v}${unit}`;
      break;
    case 'eq':
      phrase = `${v}${unit}`;
      break;
    case 'ne':
      phrase = `anything but ${v}${unit}`;
      break;
    case 'gte':
      phrase = `at least ${v}${unit}`;
      break;
    case 'gt':
      phrase = `more than ${v}${unit}`;
      break;
    case 'between': {
      const hi = bare(metric, rule.valueMax ?? rule.value);
      // A range whose ends are equal reads as the one value, not "between 110 % and 110 %".
      phrase = hi === v ? `${v}${unit}` : `between ${v} and ${hi}${unit}`;
      break;
    }
  }
  const tol = rule.tolerance ? ` (± ${bare(metric, rule.tolerance)}${unit})` : '';
  return `${metric.label} must be ${phrase}${tol}.`;
}

export function evaluateRule(rule: Rule, report: MetricReport, ctx?: MetricContext): RuleResult {
  const metric = metricById(rule.metric);
  if (!metric) return { rule, status: 'unknown', measured: null, source: null, message: `Unknown metric ${rule.metric}.` };
  const figure = metric.get(report, ctx);
  const sentence = ruleSentence(rule);
  if (figure.value === null) {
    return { rule, status: 'unknown', measured: null, source: null, message: `${sentence} Not checked: ${figure.detail ?? 'no value in the report.'}` };
  }
  const m = typeof figure.value === 'boolean' ? (figure.value ? 1 : 0) : figure.value;
  const ok = compare(rule, m);
  const shown = formatMetricValue(metric, figure.value);
  const from = figure.source === 'measured' ? 'measured from the toolpaths' : figure.source === 'declared' ? 'declared in the comment block' : figure.source;
  const note = figure.source === 'declared' ? ' (the toolpaths could not confirm it)' : '';
  return {
    rule,
    status: ok ? 'pass' : 'fail',
    measured: figure.value,
    source: figure.source,
    message: `${sentence} ${ok ? 'Passes' : 'Fails'}: ${shown}, ${from}${note}.`,
  };
}

export function evaluateRules(rules: readonly Rule[], report: MetricReport, ctx?: MetricContext): RuleResult[] {
  return rules.map((r) => evaluateRule(r, report, ctx));
}

export type { MetricId };

/** A rule result's measured value for people: units and sensible decimals, '—' when unknown. */
export function formatRuleMeasured(metricId: string | undefined, v: number | boolean | null | undefined): string {
  if (v === null || v === undefined) return '—';
  const metric = metricId ? metricById(metricId) : undefined;
  if (!metric) return typeof v === 'boolean' ? (v ? 'yes' : 'no') : String(+v.toFixed(3));
  return formatMetricValue(metric, v);
}
