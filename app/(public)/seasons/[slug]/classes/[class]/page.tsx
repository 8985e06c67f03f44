import Link from 'next/link';
import type { Metadata } from 'next';
import { HttpError } from '@/lib/errors';
import { DEFAULT_QUERY, parseStandingsQuery, standingsSearchParams, type StandingsQuery } from '@/lib/standings/params';
import { classStandings, findSeason, parseSlug } from '@/lib/standings/views';
import { StandingsTable } from '@/components/standings/StandingsTable';
import { loadOr404 } from '@/components/standings/load';
import { StatePill } from '@/components/StatePill';
import { getSequelize } from '@/lib/db';
import { QueryTypes } from 'sequelize';
import { keptForVersion } from '@/lib/standings/publicCache';

const FORM_FILTERS = new Set(['material', 'motion', 'q']);

type Props = { params: Promise<{ slug: string; class: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const p = await params;
  return { title: `Standings · ${p.class}` };
}

export default async function ClassStandingsPage({ params, searchParams }: Props) {
  const p = await params;
  let query: StandingsQuery = DEFAULT_QUERY;
  let queryError: string | null = null;
  try {
    // The page's GET forms send empty fields for "all"; an empty filter there is no filter (the API stays strict).
    const sp = Object.entries(await searchParams).filter(([k, v]) => !(FORM_FILTERS.has(k) && (v === '' || (typeof v === 'string' && !v.trim()))));
    query = parseStandingsQuery(Object.fromEntries(sp));
  } catch (err) {
    if (!(err instanceof HttpError)) throw err;
    queryError = err.message;
  }
  const { view, season, classes } = await loadOr404(
    keptForVersion(`class:${p.slug}:${p.class}?${standingsSearchParams(query)}`, async () => {
      const seasonSlug = parseSlug(p.slug, 'season');
      const view = await classStandings(seasonSlug, parseSlug(p.class, 'class'), query);
      const season = await findSeason(seasonSlug);
      const classes = await getSequelize().query<{ slug: string; name: string }>('SELECT slug, name FROM classes WHERE season_id = ? ORDER BY display_order, id', { replacements: [season.id], type: QueryTypes.SELECT });
      return { view, season, classes };
    }),
  );
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-ink-600">
        <Link href="/seasons">Seasons</Link> › <Link href={`/seasons/${season.slug}`}>{season.name}</Link> › {view.class.name}
      </nav>
      <header className="space-y-2">
        <div className="flex flex-wrap items-center gap-3">
          <h1>{view.class.name}</h1>
          <StatePill state={season.state} />
        </div>
        <p className="text-ink-700">{view.class.description}</p>
        <p className="text-sm text-ink-600">
          {view.season.frozen
            ? 'Final standings: frozen when the season closed; later decisions do not change them.'
            : 'Live standings: the best verified entry of each entrant, by claimed time; ties go to the earlier submission.'}{' '}
          <Link href={`/seasons/${season.slug}/overview`}>Season overview charts</Link>
        </p>
        <nav aria-label="Classes" className="flex flex-wrap gap-2">
          {classes.map((c) => (
            <Link key={c.slug} href={`/seasons/${season.slug}/classes/${c.slug}`} aria-current={c.slug === view.class.slug ? 'page' : undefined} className={`pill ${c.slug === view.class.slug ? 'bg-ember-600 text-white' : 'bg-ink-100 text-ink-700'}`}>
              {c.name}
            </Link>
          ))}
        </nav>
      </header>
      {queryError && <p role="alert" className="field-error">{queryError} Showing the default view.</p>}
      <StandingsTable seasonSlug={season.slug} classSlug={view.class.slug} query={query} data={view.page} />
    </div>
  );
}
