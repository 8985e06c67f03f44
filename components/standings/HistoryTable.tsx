/** Verified entries across seasons with their standings rank (entrant and machine pages). */
import Link from 'next/link';
import type { HistoryEntry } from '@/lib/standings/views';
import { formatDate, formatDurationMs, formatNumber } from '@/lib/format';
import { MATERIALS } from '@/lib/inspection/materials';

export function HistoryTable({ entries, show }: { entries: HistoryEntry[]; show: 'machine' | 'entrant' }) {
  return (
    // Scrolls sideways inside its card on a phone instead of widening the page.
    <div className="card overflow-x-auto p-0">
      <table className="table" data-testid="history-table">
        <thead>
          <tr>
            <th scope="col">Season</th><th scope="col">Class</th><th scope="col">Rank</th><th scope="col">Time</th>
            <th scope="col">{show === 'machine' ? 'Machine' : 'Entrant'}</th><th scope="col">Material</th><th scope="col">Peak flow (mm³/s)</th><th scope="col">Submitted</th>
          </tr>
        </thead>
        <tbody>
          {entries.map((e) => (
            <tr key={e.entry_id}>
              <td><Link href={`/seasons/${e.season.slug}`}>{e.season.name}</Link></td>
              <td><Link href={`/seasons/${e.season.slug}/classes/${e.class.slug}`}>{e.class.name}</Link></td>
              <td className="num">{e.rank ?? <span className="text-ink-500" title="Not this entrant's best print in the class">—</span>}</td>
              <td><Link className="num" href={`/entries/${e.entry_id}`}>{formatDurationMs(e.time_ms)}</Link></td>
              <td>{show === 'machine' ? <Link href={`/machines/${e.machine.id}`}>{e.machine.name}</Link> : <Link href={`/entrants/${e.entrant.id}`}>{e.entrant.name}</Link>}</td>
              <td>{MATERIALS[e.material as keyof typeof MATERIALS]?.label ?? e.material}</td>
              <td className="num">{formatNumber(e.peak_flow_mm3s, 1)}</td>
              <td>{formatDate(e.date)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
