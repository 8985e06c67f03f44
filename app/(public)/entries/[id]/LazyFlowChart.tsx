'use client';
/**
 * The flow chart of the public entry page, loaded after the page: the chart library is the largest
 * part of the page's JavaScript, and the figures above it are readable without it.
 */
import dynamic from 'next/dynamic';

export const LazyFlowChart = dynamic(() => import('@/components/charts/FlowChart').then((m) => m.FlowChart), {
  ssr: false,
  loading: () => <p className="text-sm text-ink-500">Loading the flow chart…</p>,
});
