import Link from 'next/link';
import { keptSeasonOverview } from '@/lib/standings/overview';
import { parseSlug } from '@/lib/standings/views';
import { loadOr404 } from '@/components/standings/load';
import { LazyOverviewCharts } from '@/components/charts/lazy';

export const metadata = { title: 'Season overview' };

export default async function SeasonOverviewPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const o = await loadOr404((async () => keptSeasonOverview(parseSlug(slug, 'season')))());
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-ink-600">
        <Link href="/seasons">Seasons</Link> › <Link href={`/seasons/${o.season.slug}`}>{o.season.name}</Link> › Overview
      </nav>
      <h1>{o.season.name}: overview</h1>
      <p className="max-w-3xl text-ink-700">
        Ranked prints only (each entrant’s best verified entry per class).{' '}
        {o.classes.map((c, i) => (
          <span key={c.slug}>
            {i ? ' · ' : ''}
            <Link href={`/seasons/${o.season.slug}/classes/${c.slug}`}>{c.name}</Link> ({c.ranked} ranked)
          </span>
        ))}
      </p>
      <LazyOverviewCharts url={`/api/v1/seasons/${o.season.slug}/overview`} />
    </div>
  );
}
