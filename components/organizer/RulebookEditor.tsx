'use client';
/**
 * Rulebook editor: rules over the engine's own metric list (METRICS), season-wide or for one
 * class (a class rule on a metric overrides the season's). Edits stay local until "Save rulebook",
 * which replaces the whole rulebook in one transaction.
 */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { METRICS, metricById } from '@/lib/inspection/metrics';
import { COMPARATORS, RuleSchema, ruleSentence, type Comparator } from '@/lib/inspection/rules';
import { RulebookInputSchema, type RulebookRule } from '@/lib/seasons/schemas';
import { numberOrText, sendChecked } from '@/components/organizer/api';
import { Check, Outcome, Select, TextInput } from '@/components/organizer/controls';

const COMPARATOR_LABELS: Record<Comparator, string> = {
  lt: 'less than', lte: 'at most', eq: 'exactly', ne: 'anything but', gte: 'at least', gt: 'more than', between: 'between',
};

interface Row {
  key: number;
  classId: string;
  metric: string;
  comparator: string;
  value: string;
  valueMax: string;
  tolerance: string;
  severity: string;
  sentence: string;
}

let nextKey = 1;

function rowOf(r: RulebookRule): Row {
  const auto = ruleSentence({ ...r, sentence: undefined });
  return {
    key: nextKey++,
    classId: r.classId === null ? '' : String(r.classId),
    metric: r.metric,
    comparator: r.comparator,
    value: String(r.value),
    valueMax: r.valueMax === undefined ? '' : String(r.valueMax),
    tolerance: r.tolerance ? String(r.tolerance) : '',
    severity: r.severity,
    sentence: r.sentence && r.sentence !== auto ? r.sentence : '',
  };
}

function payloadOf(r: Row) {
  return {
    classId: r.classId ? Number(r.classId) : null,
    metric: r.metric,
    comparator: r.comparator,
    value: numberOrText(r.value),
    ...(r.comparator === 'between' ? { valueMax: numberOrText(r.valueMax) } : {}),
    ...(r.tolerance.trim() ? { tolerance: numberOrText(r.tolerance) } : {}),
    severity: r.severity,
    ...(r.sentence.trim() ? { sentence: r.sentence.trim() } : {}),
  };
}

function preview(r: Row): string | null {
  const parsed = RuleSchema.safeParse({ ...payloadOf(r), sentence: undefined });
  return parsed.success ? ruleSentence(parsed.data) : null;
}

export function RulebookEditor(props: {
  seasonId: number;
  classes: { id: number; name: string }[];
  rules: RulebookRule[];
  freeze: { reason: string; reinspectAllowed: boolean } | null;
}) {
  const router = useRouter();
  const [rows, setRows] = useState<Row[]>(() => props.rules.map(rowOf));
  const [reinspect, setReinspect] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [outcome, setOutcome] = useState<{ error?: string; message?: string }>({});
  const [busy, setBusy] = useState(false);
  const locked = !!props.freeze && !props.freeze.reinspectAllowed;

  const update = (key: number, patch: Partial<Row>) => setRows((cur) => cur.map((r) => (r.key === key ? { ...r, ...patch } : r)));
  const add = () =>
    setRows((cur) => [...cur, { key: nextKey++, classId: '', metric: METRICS[0].id, comparator: 'eq', value: '', valueMax: '', tolerance: '', severity: 'blocking', sentence: '' }]);
  const remove = (key: number) => setRows((cur) => cur.filter((r) => r.key !== key));
  const move = (i: number, d: number) =>
    setRows((cur) => {
      const j = i + d;
      if (j < 0 || j >= cur.length) return cur;
      const next = [...cur];
      [next[i], next[j]] = [next[j], next[i]];
      return next;
    });

  async function save() {
    setOutcome({});
    const body = { rules: rows.map(payloadOf), reinspect };
    setBusy(true);
    const res = await sendChecked(RulebookInputSchema, body, `/api/organizer/seasons/${props.seasonId}/rules`, 'PUT', 'Some rules need attention; see the messages next to them.');
    setBusy(false);
    setErrors(res.fields);
    if (!res.ok) {
      setOutcome({ error: res.error ?? undefined });
      return;
    }
    setRows((res.data.rules as RulebookRule[]).map(rowOf));
    setReinspect(false);
    setOutcome({ message: res.data.message });
    router.refresh();
  }

  const classOptions = [{ value: '', label: 'Whole season' }, ...props.classes.map((c) => ({ value: String(c.id), label: `Class: ${c.name}` }))];
  return (
    <div className="space-y-4">
      {props.freeze && <p className="rounded-lg border border-ember-300 bg-ember-50 p-3 text-sm text-ember-800" data-testid="rules-frozen">{props.freeze.reason}</p>}
      {rows.length === 0 && <p className="text-sm text-ink-600">No rules yet.</p>}
      <ol className="space-y-3" data-testid="rule-list">
        {rows.map((r, i) => {
          const metric = metricById(r.metric);
          const e = (k: string) => errors[`rules.${i}.${k}`];
          const id = (k: string) => `rule-${i + 1}-${k}`;
          const sentence = preview(r);
          return (
            <li key={r.key} className="rounded-lg border border-ink-200 p-3" aria-label={`Rule ${i + 1}`}>
              <fieldset disabled={locked} className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
                <Select id={id('scope')} label="Applies to" value={r.classId} onChange={(v) => update(r.key, { classId: v })} options={classOptions} error={e('classId')} />
                <Select id={id('metric')} label="Metric" value={r.metric} error={e('metric')}
                  onChange={(v) => update(r.key, { metric: v, ...(metricById(v)?.kind === 'boolean' ? { comparator: 'eq', value: '0' } : {}) })}
                  options={METRICS.map((m) => ({ value: m.id, label: m.unit ? `${m.label} (${m.unit})` : m.label }))} />
                <Select id={id('comparator')} label="Must be" value={r.comparator} onChange={(v) => update(r.key, { comparator: v })} error={e('comparator')}
                  options={COMPARATORS.map((c) => ({ value: c, label: COMPARATOR_LABELS[c] }))} />
                {metric?.kind === 'boolean' ? (
                  <Select id={id('value')} label="Value" value={r.value} onChange={(v) => update(r.key, { value: v })} error={e('value')} options={[{ value: '1', label: 'yes' }, { value: '0', label: 'no' }]} />
                ) : (
                  <TextInput id={id('value')} label={`Value${metric?.unit ? ` (${metric.unit})` : ''}`} inputMode="decimal" value={r.value} onChange={(v) => update(r.key, { value: v })} error={e('value')} />
                )}
                {r.comparator === 'between' && (
                  <TextInput id={id('valueMax')} label={`Upper value${metric?.unit ? ` (${metric.unit})` : ''}`} inputMode="decimal" value={r.valueMax} onChange={(v) => update(r.key, { valueMax: v })} error={e('valueMax')} />
                )}
                <TextInput id={id('tolerance')} label="Tolerance (±)" inputMode="decimal" value={r.tolerance} onChange={(v) => update(r.key, { tolerance: v })} error={e('tolerance')} />
                <Select id={id('severity')} label="Severity" value={r.severity} onChange={(v) => update(r.key, { severity: v })} error={e('severity')}
                  options={[{ value: 'blocking', label: 'Blocking (stops submission)' }, { value: 'advisory', label: 'Advisory (flags for judges)' }]} />
                <TextInput id={id('sentence')} className="sm:col-span-2" label="Own sentence (optional)" value={r.sentence} onChange={(v) => update(r.key, { sentence: v })} error={e('sentence')} placeholder={sentence ?? ''} />
              </fieldset>
              <div className="mt-2 flex flex-wrap items-center justify-between gap-2">
                <p className="text-sm text-ink-700" data-testid="rule-sentence">{r.sentence.trim() || sentence || <span className="text-ink-400">Fill in the value to see the sentence.</span>}</p>
                {!locked && (
                  <div className="flex gap-2">
                    <button type="button" className="btn-quiet px-2 py-1" onClick={() => move(i, -1)} disabled={i === 0} aria-label={`Move rule ${i + 1} up`}>↑</button>
                    <button type="button" className="btn-quiet px-2 py-1" onClick={() => move(i, 1)} disabled={i === rows.length - 1} aria-label={`Move rule ${i + 1} down`}>↓</button>
                    <button type="button" className="btn-quiet px-2 py-1 text-alarm-700" onClick={() => remove(r.key)} aria-label={`Remove rule ${i + 1}`}>Remove</button>
                  </div>
                )}
              </div>
            </li>
          );
        })}
      </ol>
      {errors.rules && <p className="field-error" role="alert">{errors.rules}</p>}
      {!locked && (
        <div className="flex flex-wrap items-center gap-4">
          <button type="button" className="btn-quiet" onClick={add}>Add rule</button>
          {props.freeze?.reinspectAllowed && (
            <Check id="rules-reinspect" checked={reinspect} onChange={setReinspect} label="Re-inspect every entry under the new rules" />
          )}
          <button type="button" className="btn-primary" onClick={save} disabled={busy}>{busy ? 'Saving…' : 'Save rulebook'}</button>
        </div>
      )}
      <Outcome error={outcome.error} message={outcome.message} testId="rulebook" />
    </div>
  );
}
