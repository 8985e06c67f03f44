import Link from 'next/link';
import { connection } from 'next/server';
import { publicSeasons } from '@/lib/queries';
import { StatePill } from '@/components/StatePill';
import { formatDate, formatSeasonWindow } from '@/lib/format';

export const metadata = { title: 'Seasons' };

export default async function SeasonsPage() {
  await connection();
  const seasons = await publicSeasons();
  return (
    <div>
      <h1 className="mb-6">Seasons</h1>
      <table className="table card">
        <thead><tr><th>Season</th><th>Host</th><th>Dates</th><th>Classes</th><th>State</th></tr></thead>
        <tbody>
          {seasons.map((s) => (
            <tr key={s.id}>
              <td><Link href={`/seasons/${s.slug}`}>{s.name}</Link></td>
              <td>{s.hostName}</td>
              <td>{formatSeasonWindow(s.opensAt, s.closesAt, s.timeZone, false)}</td>
              <td>{s.classes.length}</td>
              <td><StatePill state={s.state} /></td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
