import Link from 'next/link';
import { requirePageRole } from '@/lib/auth/guard';
import { ownLatestDecision, reviewQueue, queueSearchParams, QueueFilterSchema, QUEUE_SORTS, QUEUE_VIEWS, QUEUE_SEARCH_MAX, type QueueFilter, type QueueSort, type QueueView } from '@/lib/reviews/queue';
import { DECISION_LABELS } from '@/lib/reviews/reasons';
import { DecidedNote } from '@/components/judging/DecidedNote';
import { parseId } from '@/lib/ids';
import type { ReviewDecision } from '@/lib/domain';
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
  // Any change of filter starts again at page 1 unless the change is the page itself.
  const q = queueSearchParams(f, { page: undefined, ...change });
  return q ? `/judging?${q}` : '/judging';
}

export default async function JudgingPage({ searchParams }: { searchParams: Promise<Record<string, string>> }) {
  const judge = await requirePageRole('/judging', 'judge');
  const parsed = QueueFilterSchema.safeParse(await searchParams);
  const filter: QueueFilter = parsed.success ? parsed.data : {};
  const rawQuery = await searchParams;
  // After the last entry of a list is decided, the judge lands here; say what was recorded.
  const decidedId = typeof rawQuery.decided === 'string' ? parseId(rawQuery.decided) : null;
  const decidedNote = decidedId ? await ownLatestDecision(judge.id, decidedId) : null;
  const { view, sort, seasons, classes, flagCounts, total, matched, page, pageCount, entries, conflicts } = await reviewQueue(judge.id, { ...filter, season: undefined });
  // The review screen keeps the judge's place: same view, filters and sort for previous/next.
  const keep = queueSearchParams({ ...filter, page: undefined });
  const reviewHref = (id: number) => `/judging/entries/${id}${keep ? `?${keep}` : ''}`;
  return (
    <div className="space-y-6">
      <h1>Review desk</h1>
      {decidedNote && <DecidedNote d={decidedNote} />}
      <p className="text-ink-600">
        Seasons you judge: {seasons.length ? seasons.map((s) => `${s.name}${s.verificationsRequired > 1 ? ` (${s.verificationsRequired} verifying judges)` : ''}`).join(', ') : 'none yet — an organizer appoints judges per season.'}
      </p>
      {!parsed.success && <p className="field-error" role="alert">{parsed.error.issues[0]?.message ?? 'That filter is not known.'} Showing everything instead.</p>}
      <nav aria-label="Queue views" className="flex gap-2" data-testid="queue-views">
        {(Object.keys(QUEUE_VIEWS) as QueueView[]).map((v) => (
          <Link key={v} href={href({ ...filter, sort: undefined }, { view: v === 'waiting' ? undefined : v })} aria-current={view === v ? 'page' : undefined}
            className={`rounded-lg px-3 py-1.5 text-sm ${view === v ? 'bg-ink-800 font-semibold text-white' : 'bg-ink-100 text-ink-700'}`}>{QUEUE_VIEWS[v]}</Link>
        ))}
      </nav>
      <form method="get" action="/judging" className="card flex flex-wrap items-end gap-3" role="search" aria-label="Search and sort the queue">
        {view !== 'waiting' && <input type="hidden" name="view" value={view} />}
        {filter.class && <input type="hidden" name="class" value={filter.class} />}
        {filter.flag && <input type="hidden" name="flag" value={filter.flag} />}
        <div className="min-w-56 flex-1">
          <label htmlFor="queue-q" className="label">Entrant or machine</label>
          <input id="queue-q" name="q" type="search" className="input" defaultValue={filter.q ?? ''} maxLength={QUEUE_SEARCH_MAX} placeholder="Part of a name" />
        </div>
        <div>
          <label htmlFor="queue-sort" className="label">Order</label>
          <select id="queue-sort" name="sort" className="input" defaultValue={sort}>
            {(Object.keys(QUEUE_SORTS) as QueueSort[]).filter((k) => view === 'decided' || k !== 'decided').map((k) => <option key={k} value={k}>{QUEUE_SORTS[k]}</option>)}
          </select>
        </div>
        <button type="submit" className="btn-primary">Show</button>
        {filter.q && <Link href={href(filter, { q: undefined })} className="text-sm">Clear the search</Link>}
      </form>
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
        <h2 className="mb-3">{view === 'waiting' ? 'Waiting for review' : 'Decided'} ({matched}{matched !== total ? ` of ${total}` : ''}){filter.q ? ` matching “${filter.q}”` : ''}</h2>
        {conflicts.count > 0 && (
          <p className="mb-3 text-sm text-ink-600" data-testid="conflict-note">
            {conflicts.count} {conflicts.count === 1 ? 'entry is' : 'entries are'} left off: you compete in {conflicts.classes.join(', ')}, so other judges decide {conflicts.count === 1 ? 'it' : 'them'}.
          </p>
        )}
        {entries.length === 0 ? <p>{view === 'waiting' ? 'Nothing is waiting' : 'Nothing decided yet'}{total || filter.q ? ' with these filters' : ''}.</p> : (
          <table className="table" data-testid="queue">
            <thead><tr><th>#</th><th>Season</th><th>Class</th><th>Entrant</th><th>Machine</th><th>Claimed time</th><th>Estimated minimum</th><th>Flags</th><th>{view === 'waiting' ? 'Verified' : 'Decision'}</th><th>Submitted</th></tr></thead>
            <tbody>
              {entries.map((e) => (
                <tr key={e.id} data-testid="queue-row">
                  <td className="num"><Link href={reviewHref(e.id)}>Review #{e.id}</Link></td>
                  <td>{e.season}</td><td>{e.class}</td><td>{e.entrant}</td><td>{e.machine ?? '—'}</td>
                  <td className="num">{formatDurationMs(e.claimedTimeMs)}</td>
                  <td className="num">{formatDurationS(e.inspection?.estimatedTimeS)}</td>
                  <td className="space-x-1">{e.flags.map((f) => <span key={f} className={`pill ${FLAG_TONE[f]}`}>{QUEUE_FLAG_FILTERS[f]}</span>)}{!e.inspection && <span className="pill bg-ink-100 text-ink-600">not inspected</span>}{e.reopened && (
                    <details className="mt-1 text-xs" data-testid="reopened-note"><summary>Back after re-inspection ({formatDateTime(e.reopened.at)})</summary><ul className="list-disc pl-4">{e.reopened.changes.map((c) => <li key={c.metric + c.sentence}>{c.text}</li>)}</ul></details>
                  )}</td>
                  {view === 'waiting' ? (
                    <td className="num">{e.verifications.count}/{e.verifications.required}{e.verifications.byMe ? ' (you)' : ''}</td>
                  ) : (
                    <td className="first-letter:uppercase" data-testid="queue-decision">
                      {e.decision ? <>{DECISION_LABELS[e.decision.decision as ReviewDecision]?.past ?? e.decision.decision} by {e.decision.byMe ? 'you' : e.decision.judge}<span className="block text-xs text-ink-500">{formatDateTime(e.decision.at)} · now {e.state}</span></> : '—'}
                    </td>
                  )}
                  <td>{formatDateTime(e.submittedAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        {pageCount > 1 && (
          <nav aria-label="Queue pages" className="mt-3 flex items-center gap-3 text-sm" data-testid="queue-pager">
            {page > 1 ? <Link href={href(filter, { page: page - 1 })} rel="prev">← Previous page</Link> : <span className="text-ink-400">← Previous page</span>}
            <span className="num">Page {page} of {pageCount}</span>
            {page < pageCount ? <Link href={href(filter, { page: page + 1 })} rel="next">Next page →</Link> : <span className="text-ink-400">Next page →</span>}
          </nav>
        )}
      </section>
    </div>
  );
}
