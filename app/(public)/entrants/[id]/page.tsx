import Link from 'next/link';
import { entrantHistory, parseId } from '@/lib/standings/views';
import { loadOr404 } from '@/components/standings/load';
import { HistoryTable } from '@/components/standings/HistoryTable';
import { LazyTimesOverSeasons as TimesOverSeasons } from '@/components/charts/lazy';

export const metadata = { title: 'Entrant' };

export default async function EntrantPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const h = await loadOr404((async () => entrantHistory(parseId(id, 'entrant')))());
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-ink-600"><Link href="/seasons">Seasons</Link> › Entrants</nav>
      <h1>{h.entrant.name}</h1>
      <p className="text-ink-700">{h.entries.length} verified entr{h.entries.length === 1 ? 'y' : 'ies'} across {new Set(h.entries.map((e) => e.season.slug)).size} season(s). The rank is shown on the print that counts in each class.</p>
      <TimesOverSeasons points={h.best_per_season} />
      <HistoryTable entries={h.entries} show="machine" />
    </div>
  );
}
