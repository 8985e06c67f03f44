'use client';
/**
 * The charts of the public pages, loaded after the page: the chart library (recharts, ~110 KB
 * gzip) is the largest part of a page's JavaScript, and the text and figures around a chart are
 * readable without it. Charts are measured in the browser (ResponsiveContainer), so rendering
 * them on the server would draw nothing anyway. Each placeholder holds the chart's height, so the
 * page does not jump when the chart arrives.
 */
import dynamic from 'next/dynamic';
import { OverviewChartsLoading } from '@/components/standings/OverviewChartsLoading';

/** A chart of ours on its own card is about 22rem high (components/standings/charts.tsx, Frame). */
const placeholder = (what: string, className = 'card min-h-[22rem] text-sm text-ink-500') => {
  function Loading() {
    return <p className={className}>Loading the {what}…</p>;
  }
  return Loading;
};

export const LazyFlowChart = dynamic(() => import('@/components/charts/FlowChart').then((m) => m.FlowChart), { ssr: false, loading: placeholder('flow chart', 'text-sm text-ink-500') });
export const LazyOverviewCharts = dynamic(() => import('@/components/standings/OverviewCharts').then((m) => m.OverviewCharts), { ssr: false, loading: OverviewChartsLoading });
export const LazyTimesOverSeasons = dynamic(() => import('@/components/standings/charts').then((m) => m.TimesOverSeasons), { ssr: false, loading: placeholder('chart of times over the seasons') });
