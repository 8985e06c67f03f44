import Link from 'next/link';
import { requirePageRole } from '@/lib/auth/guard';
import { organizerDashboard } from '@/lib/seasons';
import { StatePill } from '@/components/StatePill';
import { formatDate, formatDateTime, formatDurationS, formatSeasonWindow } from '@/lib/format';
import { ENTRY_STATES } from '@/lib/domain';

export const metadata = { title: 'Organize' };

export default async function OrganizePage() {
  const user = await requirePageRole('/organize', 'organizer');
  const seasons = await organizerDashboard({ organizerId: user.id });
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1>Organize</h1>
        <Link href="/organize/seasons/new" className="btn-primary">New season</Link>
      </div>
      {seasons.length === 0 && <p className="card">No seasons yet. Create the first one.</p>}
      {seasons.map((s) => (
        <section key={s.id} className="card space-y-4" aria-labelledby={`season-${s.id}`} data-testid="dashboard-season">
          <div className="flex flex-wrap items-center justify-between gap-3">
            <div className="flex flex-wrap items-center gap-3">
              <h2 id={`season-${s.id}`}><Link href={`/organize/seasons/${s.id}`}>{s.name}</Link></h2>
              <StatePill state={s.state} />
              <span className="text-sm text-ink-600">{formatSeasonWindow(s.opensAt, s.closesAt, s.timeZone, false)}</span>
            </div>
            <Link href={`/organize/seasons/${s.id}`} className="btn-quiet">Manage<span className="sr-only"> {s.name}</span></Link>
          </div>
          <dl className="grid grid-cols-3 gap-3 sm:grid-cols-6">
            {ENTRY_STATES.map((st) => (
              <div key={st} className="rounded-lg bg-ink-50 p-2 text-center">
                <dt className="text-xs capitalize text-ink-500">{st}</dt>
                <dd className="num text-lg font-semibold" data-testid={`count-${st}`}>{s.entries[st]}</dd>
              </div>
            ))}
          </dl>
          <div className="grid gap-4 sm:grid-cols-2">
            <div>
              <h3 className="text-sm font-semibold text-ink-700">Oldest entry waiting for review</h3>
              {s.oldestWaiting ? (
                <p className="text-sm" data-testid="oldest-waiting">
                  #{s.oldestWaiting.entryId} by {s.oldestWaiting.entrant}, submitted {formatDateTime(s.oldestWaiting.submittedAt, s.timeZone)} — waiting {formatDurationS(s.oldestWaiting.waitingH * 3600)}
                </p>
              ) : <p className="text-sm text-ink-600">Nothing is waiting.</p>}
            </div>
            <div>
              <h3 className="text-sm font-semibold text-ink-700">Judges’ load</h3>
              {s.judges.length === 0 ? <p className="text-sm text-ink-600">No judges appointed.</p> : (
                <table className="table" data-testid="judge-load">
                  <thead><tr><th>Judge</th><th className="text-right">Waiting for them</th><th className="text-right">Reviews done</th></tr></thead>
                  <tbody>
                    {s.judges.map((j) => (
                      <tr key={j.userId}><td>{j.name}</td><td className="num text-right">{j.waiting}</td><td className="num text-right">{j.reviews}</td></tr>
                    ))}
                  </tbody>
                </table>
              )}
            </div>
          </div>
        </section>
      ))}
    </div>
  );
}
