'use client';
/** Who runs a season: the creator and co-organizers, added and removed by e-mail. */
import { useEmailAction } from '@/components/organizer/useEmailAction';
import { Outcome, TextInput } from '@/components/organizer/controls';

export function OrganizersPanel(props: { seasonId: number; organizers: { userId: number; name: string; email: string; creator: boolean }[] }) {
  const { email, setEmail, fieldError, outcome, busy, submit, remove: del } = useEmailAction();
  const add = () => submit(`/api/organizer/seasons/${props.seasonId}/organizers`);
  const remove = (userId: number, name: string) => del(`/api/organizer/seasons/${props.seasonId}/organizers/${userId}`, `Remove ${name} from the organizers of this season?`);

  return (
    <div className="space-y-4">
      <ul className="divide-y divide-ink-100" data-testid="organizer-list">
        {props.organizers.map((o) => (
          <li key={o.userId} className="flex flex-wrap items-center justify-between gap-2 py-2">
            <span><strong>{o.name}</strong> <span className="text-sm text-ink-500">{o.email}</span>{o.creator && <span className="text-sm text-ink-600"> · created the season</span>}</span>
            {!o.creator && (
              <button type="button" className="btn-quiet px-2 py-1" onClick={() => remove(o.userId, o.name)}>
                Remove<span className="sr-only"> {o.name}</span>
              </button>
            )}
          </li>
        ))}
      </ul>
      <form className="flex flex-wrap items-end gap-3" noValidate onSubmit={(e) => { e.preventDefault(); void add(); }} aria-label="Co-organizers">
        <TextInput id="organizer-email" label="Co-organizer’s e-mail" type="email" value={email} onChange={setEmail} error={fieldError} className="min-w-72"
          hint="An account with the organizer role. Co-organizers manage this season only." />
        <button type="submit" className="btn-primary" disabled={busy}>Add co-organizer</button>
      </form>
      <Outcome error={outcome.error} message={outcome.message} testId="organizers" />
    </div>
  );
}
