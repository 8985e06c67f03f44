import { requirePageRole } from '@/lib/auth/guard';
import { entrantOverview } from '@/lib/queries';
import { StatePill } from '@/components/StatePill';
import { formatDurationMs, formatDate } from '@/lib/format';
import { MOTION_SYSTEM_LABELS } from '@/lib/domain';

export const metadata = { title: 'My entries' };

export default async function MePage() {
  const user = await requirePageRole('/me', 'entrant');
  const { entries, machines } = await entrantOverview(user.id);
  return (
    <div className="space-y-8">
      <h1>My entries</h1>
      <section className="card overflow-x-auto">
        {entries.length === 0 ? <p>No entries yet.</p> : (
          <table className="table">
            <thead><tr><th>Season</th><th>Class</th><th>Machine</th><th>Claimed time</th><th>Submitted</th><th>State</th></tr></thead>
            <tbody>
              {entries.map((e) => (
                <tr key={e.id}>
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
        <h2 className="mb-3">Machines</h2>
        <ul className="grid gap-3 sm:grid-cols-3">
          {machines.map((m) => (
            <li key={m.id} className="card">
              <p className="font-semibold">{m.name}</p>
              <p className="text-sm text-ink-600">{MOTION_SYSTEM_LABELS[m.motionSystem]} · {m.nozzleMm} mm nozzle{m.retired ? ' · retired' : ''}</p>
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
