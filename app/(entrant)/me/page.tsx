import Link from 'next/link';
import { requirePageRole } from '@/lib/auth/guard';
import { entrantOverview } from '@/lib/queries';
import { StatePill } from '@/components/StatePill';
import { formatDurationMs, formatDate } from '@/lib/format';
import { MOTION_SYSTEM_LABELS } from '@/lib/domain';
import { Season } from '@/models';

export const metadata = { title: 'My entries' };

export default async function MePage() {
  const user = await requirePageRole('/me', 'entrant');
  const [{ entries, machines }, open] = await Promise.all([entrantOverview(user.id), Season.findAll({ where: { state: 'open' }, order: [['closesAt', 'ASC']] })]);
  return (
    <div className="space-y-8">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1>My entries</h1>
        <div className="flex flex-wrap gap-2">
          {open.map((s) => <Link key={s.id} href={`/me/entries/new?season=${s.slug}`} className="btn-primary">New entry in {s.name}</Link>)}
        </div>
      </div>
      <section className="card overflow-x-auto">
        {entries.length === 0 ? <p>No entries yet.</p> : (
          <table className="table" data-testid="my-entries">
            <thead><tr><th>#</th><th>Season</th><th>Class</th><th>Machine</th><th>Claimed time</th><th>Submitted</th><th>State</th></tr></thead>
            <tbody>
              {entries.map((e) => (
                <tr key={e.id}>
                  <td><Link href={`/me/entries/${e.id}`}>#{e.id}</Link></td>
                  <td>{e.season}</td><td>{e.class}</td><td>{e.machine}</td>
                  <td className="num">{formatDurationMs(e.claimedTimeMs)}</td>
                  <td>{formatDate(e.submittedAt)}</td>
                  <td><StatePill state={e.state} /></td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
      <section>
        <div className="mb-3 flex items-center justify-between">
          <h2>Machines</h2>
          <Link href="/me/machines">Manage machines</Link>
        </div>
        <ul className="grid gap-3 sm:grid-cols-3">
          {machines.map((m) => (
            <li key={m.id} className="card">
              <p className="font-semibold"><Link href={`/me/machines/${m.id}`}>{m.name}</Link></p>
              <p className="text-sm text-ink-600">{MOTION_SYSTEM_LABELS[m.motionSystem]} · {m.nozzleMm} mm nozzle{m.retired ? ' · retired' : ''}</p>
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
