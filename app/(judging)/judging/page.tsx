import Link from 'next/link';
import { requirePageRole } from '@/lib/auth/guard';
import { reviewQueue, QueueFilterSchema, type QueueFilter } from '@/lib/reviews/queue';
import { QUEUE_FLAG_FILTERS, QUEUE_FLAG_FILTER_LIST } from '@/lib/reviews/flags';
import { formatDurationMs, formatDurationS, formatDateTime } from '@/lib/format';

export const metadata = { title: 'Review desk' };

const FLAG_TONE: Record<string, string> = {
  blocking_overridden: 'bg-alarm-100 text-alarm-700',
  advisory: 'bg-ember-100 text-ember-800',
  plausibility: 'bg-ink-800 text-white',
  clean: 'bg-coolant-100 text-coolant-700',
};

function href(f: QueueFilter, change: Partial<QueueFilter>) {
  const q = new URLSearchParams();
  const merged = { ...f, ...change };
  for (const [k, v] of Object.entries(merged)) if (v !== undefined) q.set(k, String(v));
  const s = q.toString();
  return s ? `/judging?${s}` : '/judging';
}

export default async function JudgingPage({ searchParams }: { searchParams: Promise<Record<string, string>> }) {
  const judge = await requirePageRole('/judging', 'judge');
  const parsed = QueueFilterSchema.safeParse(await searchParams);
  const filter: QueueFilter = parsed.success ? parsed.data : {};
  const { seasons, classes, flagCounts, total, entries, conflicts } = await reviewQueue(judge.id, { ...filter, season: undefined });
  return (
    <div className="space-y-6">
      <h1>Review desk</h1>
      <p className="text-ink-600">
        Seasons you judge: {seasons.length ? seasons.map((s) => `${s.name}${s.verificationsRequired > 1 ? ` (${s.verificationsRequired} verifying judges)` : ''}`).join(', ') : 'none yet — an organizer appoints judges per season.'}
      </p>
      {!parsed.success && <p className="field-error" role="alert">That filter is not known; showing everything.</p>}
      <nav aria-label="Filter the queue" className="card space-y-3">
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <span className="font-semibold text-ink-700">Class:</span>
          <Link href={href(filter, { class: undefined })} aria-current={!filter.class ? 'page' : undefined} className={!filter.class ? 'font-bold' : ''}>All</Link>
          {classes.map((c) => (
            <Link key={c.id} href={href(filter, { class: c.id })} aria-current={filter.class === c.id ? 'page' : undefined} className={filter.class === c.id ? 'font-bold' : ''}>
              {c.name} <span className="num text-ink-500">({c.count})</span>
            </Link>
          ))}
        </div>
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <span className="font-semibold text-ink-700">Flags:</span>
          <Link href={href(filter, { flag: undefined })} className={!filter.flag ? 'font-bold' : ''}>Any</Link>
          {QUEUE_FLAG_FILTER_LIST.map((k) => (
            <Link key={k} href={href(filter, { flag: k })} className={filter.flag === k ? 'font-bold' : ''} data-testid={`flag-filter-${k}`}>
              {QUEUE_FLAG_FILTERS[k]} <span className="num text-ink-500">({flagCounts[k]})</span>
            </Link>
          ))}
        </div>
      </nav>
      <section className="card overflow-x-auto">
        <h2 className="mb-3">Waiting for review ({entries.length}{entries.length !== total ? ` of ${total}` : ''})</h2>
        {conflicts.count > 0 && (
          <p className="mb-3 text-sm text-ink-600" data-testid="conflict-note">
            {conflicts.count} {conflicts.count === 1 ? 'entry is' : 'entries are'} left off: you compete in {conflicts.classes.join(', ')}, so other judges decide {conflicts.count === 1 ? 'it' : 'them'}.
          </p>
        )}
        {entries.length === 0 ? <p>Nothing is waiting{total ? ' with these filters' : ''}.</p> : (
          <table className="table" data-testid="queue">
            <thead><tr><th>#</th><th>Season</th><th>Class</th><th>Entrant</th><th>Claimed time</th><th>Estimated minimum</th><th>Flags</th><th>Verified</th><th>Submitted</th></tr></thead>
            <tbody>
              {entries.map((e) => (
                <tr key={e.id} data-testid="queue-row">
                  <td className="num"><Link href={`/judging/entries/${e.id}`}>Review #{e.id}</Link></td>
                  <td>{e.season}</td><td>{e.class}</td><td>{e.entrant}</td>
                  <td className="num">{formatDurationMs(e.claimedTimeMs)}</td>
                  <td className="num">{formatDurationS(e.inspection?.estimatedTimeS)}</td>
                  <td className="space-x-1">{e.flags.map((f) => <span key={f} className={`pill ${FLAG_TONE[f]}`}>{QUEUE_FLAG_FILTERS[f]}</span>)}{!e.inspection && <span className="pill bg-ink-100 text-ink-600">not inspected</span>}{e.reopened && (
                    <details className="mt-1 text-xs" data-testid="reopened-note"><summary>Back after re-inspection ({formatDateTime(e.reopened.at)})</summary><ul className="list-disc pl-4">{e.reopened.changes.map((c) => <li key={c.metric + c.sentence}>{c.text}</li>)}</ul></details>
                  )}</td>
                  <td className="num">{e.verifications.count}/{e.verifications.required}{e.verifications.byMe ? ' (you)' : ''}</td>
                  <td>{formatDateTime(e.submittedAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
