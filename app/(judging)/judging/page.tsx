import { requirePageRole } from '@/lib/auth/guard';
import { judgeQueue } from '@/lib/queries';
import { formatDurationMs, formatDateTime } from '@/lib/format';

export const metadata = { title: 'Review desk' };

export default async function JudgingPage() {
  const judge = await requirePageRole('/judging', 'judge');
  const { seasons, entries } = await judgeQueue(judge.id);
  return (
    <div className="space-y-6">
      <h1>Review desk</h1>
      <p className="text-ink-600">
        Seasons you judge: {seasons.length ? seasons.map((s) => s.name).join(', ') : 'none yet — an organizer appoints judges per season.'}
      </p>
      <section className="card overflow-x-auto">
        <h2 className="mb-3">Waiting for review ({entries.length})</h2>
        {entries.length === 0 ? <p>Nothing is waiting.</p> : (
          <table className="table">
            <thead><tr><th>#</th><th>Season</th><th>Class</th><th>Entrant</th><th>Claimed time</th><th>Submitted</th></tr></thead>
            <tbody>
              {entries.map((e) => (
                <tr key={e.id}>
                  <td className="num">{e.id}</td><td>{e.season}</td><td>{e.class}</td><td>{e.entrant}</td>
                  <td className="num">{formatDurationMs(e.claimedTimeMs)}</td><td>{formatDateTime(e.submittedAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
