/** The read-only public rulebook: the same stored rules the engine checks, as plain sentences. */
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { publicSeason } from '@/lib/seasons/view';
import { currentUser } from '@/lib/auth/guard';
import { isSubscribed } from '@/lib/seasons/subscriptions';
import { eligibilityText } from '@/lib/seasons/eligibility';
import { metricById } from '@/lib/inspection/metrics';
import { StatePill } from '@/components/StatePill';
import { SafetyNotes } from '@/components/SafetyNotes';
import { SubscribeForm } from '@/components/organizer/SubscribeForm';
import { formatDateTime, formatSeasonWindow } from '@/lib/format';
import { SeverityPill } from '@/components/SeverityPill';

export async function generateMetadata({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const view = await publicSeason(slug);
  return { title: view ? `Rulebook · ${view.season.name}` : 'Rulebook' };
}

export default async function RulebookPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const view = await publicSeason(slug);
  if (!view) notFound();
  const { season, classes, rules, testPiece } = view;
  const user = await currentUser();
  const subscribed = user ? await isSubscribed(season.id, user.id) : false;
  const seasonRules = rules.filter((r) => r.classId == null);
  const label = (metric: string) => metricById(metric)?.label ?? metric;
  return (
    <div className="space-y-8">
      <header className="space-y-2">
        <p className="text-sm"><Link href={`/seasons/${season.slug}`}>← {season.name}</Link> · <Link href={`/seasons/${season.slug}/check`}>Check a G-code against this rulebook</Link></p>
        <div className="flex flex-wrap items-center gap-3">
          <h1>Rulebook · {season.name}</h1>
          <StatePill state={season.state} />
        </div>
        <p className="text-ink-600">Hosted by {season.hostName} · entries {formatSeasonWindow(season.opensAt, season.closesAt, season.timeZone)}</p>
        <SubscribeForm slug={season.slug} back={`/seasons/${season.slug}/rulebook`} subscribed={subscribed} signedIn={!!user} />
      </header>

      <section className="card space-y-2" aria-labelledby="h-timed-print">
        <h2 id="h-timed-print">The timed print</h2>
        <ul className="list-disc space-y-1 pl-5 text-sm">
          {testPiece && (
            <li>Print the test piece <strong>{testPiece.name}</strong> at 100 % scale: <span className="num">{testPiece.sizeXMm.toFixed(2)} × {testPiece.sizeYMm.toFixed(2)} × {testPiece.sizeZMm.toFixed(2)} mm</span>.</li>
          )}
          <li>Timing: {season.timingConvention}.</li>
          <li>
            Evidence: {season.photosRequired} photo{season.photosRequired === 1 ? '' : 's'}
            {season.photoKinds?.length ? ` (${season.photoKinds.join('; ')})` : ''}
            {season.videoRequired ? ', and a link to a video of the whole print' : ''}.
          </li>
          <li>At most {season.entryLimit} entr{season.entryLimit === 1 ? 'y' : 'ies'} per entrant and class; an entry counts once {season.verificationsRequired === 1 ? 'a judge verifies it' : `${season.verificationsRequired} judges verify it`}.</li>
          <li><strong>Blocking</strong> rules stop a submission while they fail; <strong>advisory</strong> rules flag the entry for the judges.</li>
        </ul>
      </section>

      <section aria-labelledby="h-season-rules">
        <h2 id="h-season-rules" className="mb-3">Rules for every class</h2>
        {seasonRules.length === 0 ? <p className="card text-sm text-ink-600">No season-wide rules.</p> : (
          <ol className="card list-decimal space-y-2 pl-10" data-testid="rulebook-season">
            {seasonRules.map((r) => <li key={r.id}>{r.sentence} <SeverityPill severity={r.severity} /></li>)}
          </ol>
        )}
      </section>

      {classes.map((c) => {
        const own = rules.filter((r) => r.classId === c.id);
        const seasonMetrics = new Set(seasonRules.map((r) => r.metric));
        return (
          <section key={c.id} aria-labelledby={`h-class-${c.id}`} className="space-y-2">
            <h2 id={`h-class-${c.id}`}>{c.name}</h2>
            <p className="text-sm text-ink-600">{eligibilityText(c)}{c.description ? ` — ${c.description}` : ''}</p>
            {own.length === 0 ? <p className="text-sm text-ink-600">The rules for every class apply unchanged.</p> : (
              <ol className="card list-decimal space-y-2 pl-10" data-testid={`rulebook-class-${c.slug}`}>
                {own.map((r) => (
                  <li key={r.id}>
                    {r.sentence} <SeverityPill severity={r.severity} />
                    {seasonMetrics.has(r.metric) && <span className="ml-2 text-xs text-ink-500">{`(replaces the season rule on ${label(r.metric).toLowerCase()} for this class)`}</span>}
                  </li>
                ))}
              </ol>
            )}
          </section>
        );
      })}

      <SafetyNotes />
    </div>
  );
}
