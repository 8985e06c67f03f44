'use client';
/** The judge's checklist and decision: verify, reject or return, with reason codes and a note. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { REVIEW_DECISIONS, type ReviewDecision } from '@/lib/domain';
import { DECISION_LABELS, REASON_CODES, reasonsFor, type ReasonCode } from '@/lib/reviews/reasons';
import { CHECKLIST_ITEMS, CHECKLIST_ITEM_LIST, CHECK_ANSWERS, CHECK_ANSWER_LABELS, type CheckAnswer, type ChecklistItem } from '@/lib/reviews/checklist';

interface Deviation { axis: string; measuredMm: number; referenceMm: number; deltaMm: number; percent: number; withinTolerance: boolean }

/** `afterDecision`: where the judge goes once the decision is recorded (the next entry of their queue). */
export function DecisionForm(props: { afterDecision?: string; entryId: number; entryState: string; dimensions: Deviation[] | null; verifications: { count: number; required: number; byMe: boolean } }) {
  const router = useRouter();
  const [decision, setDecision] = useState<ReviewDecision | null>(null);
  const [reasons, setReasons] = useState<ReasonCode[]>([]);
  const [note, setNote] = useState('');
  const [checklist, setChecklist] = useState<Partial<Record<ChecklistItem, CheckAnswer>>>({});
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const choose = (d: ReviewDecision) => {
    setDecision(d);
    setReasons((rs) => rs.filter((r) => (REASON_CODES[r].decisions as readonly string[]).includes(d)));
  };
  const toggle = (r: ReasonCode) => setReasons((rs) => (rs.includes(r) ? rs.filter((x) => x !== r) : [...rs, r]));

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setMessage(null);
    if (!decision) return setErrors({ decision: 'Choose verify, reject or return for changes.' });
    setBusy(true);
    try {
      const res = await fetch(`/api/judging/entries/${props.entryId}/decisions`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ decision, reasonCodes: reasons, note, checklist, expectedState: props.entryState }),
      });
      const body = await res.json();
      if (!res.ok) {
        setErrors({ _: body.error, ...(body.fields ?? {}) });
        return;
      }
      const recorded =
        body.entryState === 'submitted'
          ? `Verification recorded (${body.verifications.count} of ${body.verifications.required}); another judge must verify before the entry counts.`
          : `Decision recorded: the entry is now ${body.entryState}. The entrant has been e-mailed.`;
      setMessage(props.afterDecision ? `${recorded} Opening the next entry…` : recorded);
      // On to the next entry, which shows what was recorded here (read back from the database).
      if (props.afterDecision) router.push(props.afterDecision);
      else router.refresh();
    } finally {
      setBusy(false);
    }
  }

  const err = (k: string) => errors[k] && <p id={`err-${k}`} className="field-error" role="alert">{errors[k]}</p>;
  return (
    <form onSubmit={submit} className="space-y-5" aria-label="Decision" noValidate>
      <fieldset>
        <legend className="label">Quality checklist</legend>
        <ul className="divide-y divide-ink-100">
            {CHECKLIST_ITEM_LIST.map((item) => (
              <li key={item} className="py-2">
                <p className="text-sm font-semibold text-ink-800">
                  {CHECKLIST_ITEMS[item].label}
                  <span className="block text-xs font-normal text-ink-500">{CHECKLIST_ITEMS[item].hint}</span>
                  {item === 'dimensional_accuracy' && props.dimensions && (
                    <span className="num block text-xs font-normal text-ink-700" data-testid="dimension-deviation">
                      {props.dimensions.map((d) => `${d.axis.toUpperCase()} ${d.deltaMm >= 0 ? '+' : ''}${d.deltaMm.toFixed(2)} mm (${d.percent >= 0 ? '+' : ''}${d.percent.toFixed(2)} %)`).join(' · ')}
                    </span>
                  )}
                </p>
                <div className="mt-1">
                  <div className="flex flex-wrap gap-3" role="radiogroup" aria-label={CHECKLIST_ITEMS[item].label}>
                    {CHECK_ANSWERS.map((a) => (
                      <label key={a} className="flex items-center gap-1 text-sm">
                        <input type="radio" name={`check-${item}`} value={a} checked={checklist[item] === a} onChange={() => setChecklist((c) => ({ ...c, [item]: a }))} />
                        {CHECK_ANSWER_LABELS[a]}
                      </label>
                    ))}
                  </div>
                </div>
              </li>
            ))}
        </ul>
      </fieldset>

      <fieldset aria-describedby={errors.decision ? 'err-decision' : undefined}>
        <legend className="label">Decision</legend>
        <div className="flex flex-wrap gap-4">
          {REVIEW_DECISIONS.map((d) => (
            <label key={d} className="flex items-center gap-2">
              <input type="radio" name="decision" value={d} checked={decision === d} onChange={() => choose(d)} disabled={d === 'verify' && (props.verifications.byMe || props.entryState !== 'submitted')} />
              {DECISION_LABELS[d].verb}
            </label>
          ))}
        </div>
        {props.entryState !== 'submitted' && (
          <p className="mt-1 text-xs text-ink-600">Only a submitted entry can be verified: this one is {props.entryState}, so it comes back to the desk when its entrant submits it again.</p>
        )}
        {props.verifications.required > 1 && (
          <p className="mt-1 text-xs text-ink-600">This season needs {props.verifications.required} verifying judges; {props.verifications.count} so far{props.verifications.byMe ? ' (one is yours)' : ''}.</p>
        )}
        {err('decision')}
      </fieldset>

      {decision && (
        <fieldset aria-describedby={errors.reasonCodes ? 'err-reasonCodes' : undefined}>
          <legend className="label">Reasons (one or more)</legend>
          <ul className="grid gap-1 sm:grid-cols-2">
            {reasonsFor(decision).map((r) => (
              <li key={r}>
                <label className="flex items-start gap-2 text-sm">
                  <input type="checkbox" name="reasonCodes" value={r} checked={reasons.includes(r)} onChange={() => toggle(r)} className="mt-1" />
                  {REASON_CODES[r].label}
                </label>
              </li>
            ))}
          </ul>
          {err('reasonCodes')}
        </fieldset>
      )}

      <div>
        <label htmlFor="decision-note" className="label">Note to the entrant</label>
        <textarea id="decision-note" className="input min-h-24" value={note} onChange={(e) => setNote(e.target.value)} aria-invalid={errors.note ? true : undefined} aria-describedby={errors.note ? 'err-note' : undefined} />
        {err('note')}
      </div>
      {err('_')}
      {message && <p role="status" className="rounded-lg bg-coolant-50 p-3 text-coolant-700" data-testid={props.afterDecision ? 'decision-recorded' : 'decision-result'}>{message}</p>}
      <button type="submit" className="btn-primary" disabled={busy}>{busy ? 'Recording…' : 'Record decision'}</button>
    </form>
  );
}
