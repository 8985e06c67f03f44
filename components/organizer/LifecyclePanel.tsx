'use client';
/** The season's next lifecycle step, its guards, and the subscriber notification choice. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { SEASON_STATES, type SeasonState } from '@/lib/domain';
import { TRANSITION_LABELS } from '@/lib/seasons/schemas';
import { callApi } from '@/components/organizer/api';
import { Check, Outcome } from '@/components/organizer/controls';
import { earlyTransitionQuestion } from '@/components/organizer/earlyTransition';


export function LifecyclePanel(props: {
  seasonId: number;
  state: SeasonState;
  next: { to: SeasonState; blockers: string[] } | null;
  subscribers: number;
  canReinspect: boolean;
  /** The planned window, to ask before opening or closing early (ISO instants, IANA zone). */
  window?: { opensAt: string; closesAt: string; timeZone: string };
}) {
  const router = useRouter();
  const [notify, setNotify] = useState(true);
  const [note, setNote] = useState('');
  const [outcome, setOutcome] = useState<{ error?: string; message?: string }>({});
  const [busy, setBusy] = useState(false);

  async function go() {
    if (!props.next) return;
    if (props.next.to === 'final' && !window.confirm('Publish final standings? They are frozen from then on.')) return;
    const early = props.window ? earlyTransitionQuestion(props.next.to, new Date(), props.window) : null;
    if (early && !window.confirm(early)) return;
    setBusy(true);
    setOutcome({});
    const res = await callApi(`/api/organizer/seasons/${props.seasonId}/transition`, 'POST', { to: props.next.to, notify, note });
    setBusy(false);
    if (!res.ok) return setOutcome({ error: res.data.error ?? `The server answered ${res.status}.` });
    setOutcome({ message: res.data.message });
    setNote('');
    router.refresh();
  }

  async function reinspect() {
    if (!window.confirm('Inspect every entry of this season again with the current rules and engine?')) return;
    setBusy(true);
    const res = await callApi(`/api/organizer/seasons/${props.seasonId}/reinspect`, 'POST', { confirm: true });
    setBusy(false);
    setOutcome(res.ok ? { message: res.data.message } : { error: res.data.error ?? `The server answered ${res.status}.` });
  }

  return (
    <div className="space-y-4">
      <ol className="flex flex-wrap items-center gap-2 text-sm" aria-label="Lifecycle">
        {SEASON_STATES.map((s, i) => (
          <li key={s} className="flex items-center gap-2">
            {i > 0 && <span aria-hidden className="text-ink-400">→</span>}
            <span className={`pill ${s === props.state ? 'bg-ember-600 text-white' : 'bg-ink-100 text-ink-600'}`} aria-current={s === props.state ? 'step' : undefined}>{s}</span>
          </li>
        ))}
      </ol>
      {props.next ? (
        <div className="space-y-3">
          {props.next.blockers.length > 0 && (
            <ul className="list-disc pl-5 text-sm text-alarm-700" data-testid="transition-blockers">
              {props.next.blockers.map((b) => <li key={b}>{b}</li>)}
            </ul>
          )}
          <Check id="transition-notify" checked={notify} onChange={setNotify} label={`Notify subscribers by e-mail (${props.subscribers})`} />
          {notify && (
            <div>
              <label htmlFor="transition-note" className="label">Note for the announcement (optional)</label>
              <textarea id="transition-note" className="input" rows={2} value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} />
            </div>
          )}
          <button type="button" className="btn-primary" onClick={go} disabled={busy}>{TRANSITION_LABELS[props.next.to]}</button>
        </div>
      ) : (
        <p className="text-sm text-ink-600">The season is archived; nothing follows.</p>
      )}
      {props.canReinspect && (
        <button type="button" className="btn-quiet" onClick={reinspect} disabled={busy}>Re-inspect every entry</button>
      )}
      <Outcome error={outcome.error} message={outcome.message} testId="lifecycle" />
    </div>
  );
}
