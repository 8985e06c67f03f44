'use client';
/** Judges of a season: appoint an existing account, invite by e-mail, remove, withdraw invitations. */
import { formatDateTime } from '@/lib/format';
import { useEmailAction } from '@/components/organizer/useEmailAction';
import { Outcome, TextInput } from '@/components/organizer/controls';

export function JudgesPanel(props: {
  seasonId: number;
  judges: { userId: number; name: string; email: string; appointedAt: string; conflicts: { id: number; name: string }[] }[];
  invitations: { id: number; email: string; expiresAt: string; sentAt: string }[];
  closed: string | null;
}) {
  const { email, setEmail, fieldError, outcome, busy, submit, remove: del } = useEmailAction();
  const send = (kind: 'judges' | 'invitations') => submit(`/api/organizer/seasons/${props.seasonId}/${kind}`);

  return (
    <div className="space-y-4">
      {props.judges.length === 0 ? <p className="text-sm text-ink-600">No judges yet.</p> : (
        <ul className="divide-y divide-ink-100" data-testid="judge-list">
          {props.judges.map((j) => (
            <li key={j.userId} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <span>
                <strong>{j.name}</strong> <span className="text-sm text-ink-500">{j.email}</span>
                {j.conflicts.length > 0 && (
                  <span className="block text-sm text-alarm-700" data-testid={`judge-conflicts-${j.userId}`}>
                    Competes in {j.conflicts.map((c) => c.name).join(', ')}: those entries are decided by other judges.
                  </span>
                )}
              </span>
              {!props.closed && (
                <button type="button" className="btn-quiet px-2 py-1" onClick={() => del(`/api/organizer/seasons/${props.seasonId}/judges/${j.userId}`, `Remove ${j.name} from the judges of this season?`)}>
                  Remove<span className="sr-only"> {j.name}</span>
                </button>
              )}
            </li>
          ))}
        </ul>
      )}
      {props.invitations.length > 0 && (
        <div>
          <h3 className="text-sm font-semibold text-ink-700">Invitations waiting</h3>
          <ul className="divide-y divide-ink-100" data-testid="invitation-list">
            {props.invitations.map((i) => (
              <li key={i.id} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
                <span>{i.email} · sent {formatDateTime(i.sentAt)} · expires {formatDateTime(i.expiresAt)}</span>
                {!props.closed && (
                  <button type="button" className="btn-quiet px-2 py-1" onClick={() => del(`/api/organizer/seasons/${props.seasonId}/invitations/${i.id}`, `Withdraw the invitation to ${i.email}?`)}>Withdraw</button>
                )}
              </li>
            ))}
          </ul>
        </div>
      )}
      {props.closed ? <p className="text-sm text-ink-600">{props.closed}</p> : (
        <form className="flex flex-wrap items-end gap-3" noValidate onSubmit={(e) => { e.preventDefault(); void send('invitations'); }} aria-label="Judges">
          <TextInput id="judge-email" label="Judge’s e-mail" type="email" value={email} onChange={setEmail} error={fieldError} className="min-w-72"
            hint="Appoint someone who has an account, or invite any address (they sign in or sign up with it to accept)." />
          <button type="button" className="btn-quiet" onClick={() => send('judges')} disabled={busy}>Appoint existing account</button>
          <button type="submit" className="btn-primary" disabled={busy}>Send invitation</button>
        </form>
      )}
      <Outcome error={outcome.error} message={outcome.message} testId="judges" />
    </div>
  );
}
