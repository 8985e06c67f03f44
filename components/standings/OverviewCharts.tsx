'use client';
/**
 * The season overview's three charts with their data, loaded after the page
 * (components/charts/lazy.tsx): the chart library and the points (up to 1 500 per class) come
 * together from the overview API, kept per standings version, instead of travelling in the page.
 */
import { useQuery } from '@tanstack/react-query';
import type { SeasonOverview } from '@/lib/standings/overview';
import { Providers } from '@/components/Providers';
import { readJson } from '@/components/useJsonRead';
import { EntriesTimeline, FlowScatter, TimesHistogram } from './charts';
import { OverviewChartsLoading } from './OverviewChartsLoading';

export function OverviewCharts({ url }: { url: string }) {
  return (
    <Providers>
      <Charts url={url} />
    </Providers>
  );
}

function Charts({ url }: { url: string }) {
  const q = useQuery({
    queryKey: ['json-read', url],
    queryFn: ({ signal }) => readJson<SeasonOverview>(url, signal),
  });
  if (q.error) return <p role="alert" className="field-error">The charts could not be loaded: {q.error.message}</p>;
  if (!q.data) return <OverviewChartsLoading />;
  const o = q.data;
  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <TimesHistogram bins={o.histogram} classes={o.classes} />
      <FlowScatter series={o.scatter} />
      <div className="lg:col-span-2">
        <EntriesTimeline days={o.timeline} />
      </div>
    </div>
  );
}
