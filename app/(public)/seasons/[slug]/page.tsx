import Link from 'next/link';
import { notFound } from 'next/navigation';
import { publicSeason } from '@/lib/seasons/view';
import { StatePill } from '@/components/StatePill';
import { SeverityPill } from '@/components/SeverityPill';
import { SafetyNotes } from '@/components/SafetyNotes';
import { formatDateTime, formatSeasonWindow } from '@/lib/format';
import { Markdown } from '@/components/organizer/Markdown';
import { SubscribeForm } from '@/components/organizer/SubscribeForm';
import { eligibilityText } from '@/lib/seasons/eligibility';
import { visitorUser } from '@/lib/auth/visitor';
import { keptForVersion } from '@/lib/standings/publicCache';
import { isSubscribed } from '@/lib/seasons/subscriptions';

export default async function SeasonPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const view = await keptForVersion(`season:${slug}`, () => publicSeason(slug));
  if (!view) notFound();
  const { season, classes, rules, testPiece } = view;
  const seasonRules = rules.filter((r) => r.classId == null);
  const user = await visitorUser();
  const subscribed = user ? await isSubscribed(season.id, user.id) : false;
  return (
    <div className="space-y-8">
      <header>
        <div className="flex flex-wrap items-center gap-3">
          <h1>{season.name}</h1>
          <StatePill state={season.state} />
        </div>
        <p className="text-ink-600">
          Hosted by {season.hostName} · {formatSeasonWindow(season.opensAt, season.closesAt, season.timeZone)}
        </p>
        <Markdown source={season.description} className="mt-3 max-w-3xl text-ink-800" />
        <p className="mt-2 text-sm text-ink-600">Timing: {season.timingConvention}. Evidence: {season.photosRequired} photos{season.videoRequired ? ' and a video link' : ''}.</p>
        <div className="mt-3"><SubscribeForm slug={season.slug} back={`/seasons/${season.slug}`} subscribed={subscribed} signedIn={!!user} /></div>
      </header>
      {testPiece && (
        <section className="card">
          <h2>Test piece: {testPiece.name}</h2>
          <p className="num text-sm text-ink-700">
            {testPiece.sizeXMm.toFixed(2)} × {testPiece.sizeYMm.toFixed(2)} × {testPiece.sizeZMm.toFixed(2)} mm · {testPiece.triangleCount} triangles · {(testPiece.volumeMm3 / 1000).toFixed(2)} cm³
          </p>
        </section>
      )}
      <section>
        <h2 className="mb-3">Classes</h2>
        <p className="mb-3 text-sm"><Link href={`/seasons/${season.slug}/overview`}>Season overview charts</Link> · <a href={`/api/v1/seasons/${season.slug}/results`} download data-testid="season-results-csv">Download all classes’ results (CSV)</a></p>
        <ul className="grid gap-4 sm:grid-cols-3">
          {classes.map((c) => (
            <li key={c.id} className="card">
              <h3 className="font-semibold"><Link href={`/seasons/${season.slug}/classes/${c.slug}`}>{c.name}</Link></h3>
              <p className="text-sm text-ink-600">{c.description}</p>
              <p className="mt-2 text-xs text-ink-500">{eligibilityText(c)}</p>
            </li>
          ))}
        </ul>
      </section>
      <section>
        <h2 className="mb-3">Rulebook</h2>
        <p className="mb-3 text-sm"><Link href={`/seasons/${season.slug}/rulebook`}>Full rulebook with class rules and safety notes</Link> · <Link href={`/seasons/${season.slug}/check`}>Check a G-code against this rulebook</Link></p>
        <ol className="card list-decimal space-y-1 pl-10">
          {seasonRules.map((r) => (
            <li key={r.id}>
              {r.sentence || `${r.metric} ${r.comparator} ${r.value}`}{' '}
              <SeverityPill severity={r.severity} />
            </li>
          ))}
        </ol>
      </section>
      <SafetyNotes />
    </div>
  );
}
