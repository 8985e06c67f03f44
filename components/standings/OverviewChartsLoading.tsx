/**
 * The three overview charts' places, each as high as a chart (components/standings/charts.tsx,
 * Frame). Apart from OverviewCharts.tsx: the page shows it at once, before the charts' module loads.
 */
export function OverviewChartsLoading() {
  return (
    <div className="grid gap-6 lg:grid-cols-2" aria-busy="true">
      <p className="card min-h-[22rem] text-sm text-ink-500">Loading the charts…</p>
      <p className="card min-h-[22rem] text-sm text-ink-500" aria-hidden="true" />
      <p className="card min-h-[22rem] text-sm text-ink-500 lg:col-span-2" aria-hidden="true" />
    </div>
  );
}
