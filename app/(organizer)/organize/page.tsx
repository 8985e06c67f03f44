import Link from 'next/link';
import { requirePageRole } from '@/lib/auth/guard';
import { organizerSeasons } from '@/lib/queries';
import { StatePill } from '@/components/StatePill';
import { formatDate } from '@/lib/format';
import { ENTRY_STATES } from '@/lib/domain';

export const metadata = { title: 'Organize' };

export default async function OrganizePage() {
  await requirePageRole('/organize', 'organizer');
  const seasons = await organizerSeasons();
  return (
    <div className="space-y-6">
      <h1>Organize</h1>
      <section className="card overflow-x-auto">
        <table className="table">
          <thead>
            <tr><th>Season</th><th>State</th><th>Dates</th>{ENTRY_STATES.map((s) => <th key={s} className="capitalize">{s}</th>)}</tr>
          </thead>
          <tbody>
            {seasons.map((s) => (
              <tr key={s.id}>
                <td><Link href={`/seasons/${s.slug}`}>{s.name}</Link></td>
                <td><StatePill state={s.state} /></td>
                <td>{formatDate(s.opensAt)} – {formatDate(s.closesAt)}</td>
                {ENTRY_STATES.map((st) => <td key={st} className="num">{s.entries[st]}</td>)}
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </div>
  );
}
