/**
 * Reading a stored inspection report. The engine writes snake_case JSON (toJsonReport); older rows
 * or other writers may keep the camelCase report object. These accessors read either.
 */
type Obj = Record<string, unknown>;

function at(o: unknown, path: string[]): unknown {
  let cur: unknown = o;
  for (const k of path) {
    if (!cur || typeof cur !== 'object') return undefined;
    cur = (cur as Obj)[k];
  }
  return cur;
}

/** First defined value among alternative paths ("flow.time_series" | "flow.timeSeries"). */
export function pick(o: unknown, ...paths: string[]): unknown {
  for (const p of paths) {
    const v = at(o, p.split('.'));
    if (v !== undefined) return v;
  }
  return undefined;
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const nums = (v: unknown): number[] => (Array.isArray(v) ? v.map((x) => (typeof x === 'number' && Number.isFinite(x) ? x : 0)) : []);

/**
 * Flow over print time for the chart (components/charts/FlowChart): fixed time buckets, peak and mean,
 * mm³/s. The one reader of flow.time_series; lib/standings/summary.ts thins it for the public API.
 */
export function flowSeries(report: unknown): { bucketS: number; maxMm3s: number[]; meanMm3s: number[] } {
  const bucketS = num(pick(report, 'flow.time_series.bucket_s', 'flow.timeSeries.bucketS')) ?? 0;
  if (!(bucketS > 0)) return { bucketS: 1, maxMm3s: [], meanMm3s: [] };
  return {
    bucketS,
    maxMm3s: nums(pick(report, 'flow.time_series.max_mm3s', 'flow.timeSeries.maxMm3s')),
    meanMm3s: nums(pick(report, 'flow.time_series.mean_mm3s', 'flow.timeSeries.meanMm3s')),
  };
}

export interface SettingRow {
  key: string;
  declared: number | null;
  measured: number | null;
  detail: string | null;
}

export function settingsRows(report: unknown): SettingRow[] {
  const s = pick(report, 'settings');
  if (!s || typeof s !== 'object') return [];
  return Object.entries(s as Obj).map(([key, v]) => ({
    key,
    declared: num(at(v, ['declared'])),
    measured: num(at(v, ['measured'])),
    detail: typeof at(v, ['detail']) === 'string' ? (at(v, ['detail']) as string) : null,
  }));
}

export function headline(report: unknown) {
  return {
    estimatedS: num(pick(report, 'time.estimated_s', 'time.estimatedS')),
    commandedS: num(pick(report, 'time.commanded_s', 'time.commandedS')),
    slicerEstimateS: num(pick(report, 'time.slicer_estimate_s', 'time.slicerEstimateS')),
    peakFlowMm3s: num(pick(report, 'flow.peak_mm3s', 'flow.peakMm3s')),
    p95FlowMm3s: num(pick(report, 'flow.p95_mm3s', 'flow.p95Mm3s')),
    meanFlowMm3s: num(pick(report, 'flow.mean_mm3s', 'flow.meanMm3s')),
    layers: num(pick(report, 'layers.count')),
    layerHeightMm: num(pick(report, 'layers.height_mm', 'layers.heightMm')),
    volumeMm3: num(pick(report, 'filament.volume_mm3', 'filament.volumeMm3')),
    massG: num(pick(report, 'filament.mass_g', 'filament.massG')),
    filamentDiameterMm: num(pick(report, 'filament.diameter_mm', 'filament.diameterMm')),
    sizeMm: (() => {
      const s = pick(report, 'size_mm', 'sizeMm');
      const x = num(at(s, ['x'])), y = num(at(s, ['y'])), z = num(at(s, ['z']));
      return x !== null && y !== null && z !== null ? { x, y, z } : null;
    })(),
    slicer: (pick(report, 'slicer.generator') as string | null | undefined) ?? null,
  };
}
