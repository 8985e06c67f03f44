'use client';
/**
 * Volumetric flow over print time, from an inspection's time series (fixed buckets: max and mean
 * commanded flow per bucket). Reusable by the entrant, judging and public pages: give it the
 * series, optionally the machine's measured extrusion limit to draw as a line. The series is step
 * data (one value per bucket), so it is drawn as steps starting at each bucket's start.
 */
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { niceTicks } from '@/lib/charts/niceTicks';
import { axisProps, tickFormat } from './axes';

export interface FlowSeriesProps {
  bucketS: number;
  maxMm3s: number[];
  meanMm3s: number[];
}

export function FlowChart({ series, limitMm3s = null, height = 260, title = 'Flow over time' }: { series: FlowSeriesProps; limitMm3s?: number | null; height?: number; title?: string }) {
  const n = series.maxMm3s.length;
  // Each bucket starts at i × bucketS; one more point at the end closes the last step.
  const data = series.maxMm3s.map((max, i) => ({ minute: (i * series.bucketS) / 60, max, mean: series.meanMm3s[i] ?? 0 }));
  if (n) data.push({ minute: (n * series.bucketS) / 60, max: series.maxMm3s[n - 1], mean: series.meanMm3s[n - 1] ?? 0 });
  const x = niceTicks(0, (n * series.bucketS) / 60, 6);
  const y = niceTicks(0, Math.max(1, ...series.maxMm3s, limitMm3s ?? 0), 5);
  const xFmt = tickFormat(x.step);
  return (
    <figure className="w-full" data-testid="flow-chart">
      <figcaption className="mb-1 text-sm font-semibold text-ink-700">{title}</figcaption>
      {n === 0 ? (
        <p className="text-sm text-ink-500">No extruding moves to chart.</p>
      ) : (
        <div style={{ width: '100%', height }}>
          <ResponsiveContainer width="100%" height="100%">
            <LineChart data={data} margin={{ top: 8, right: 16, bottom: 16, left: 0 }}>
              <CartesianGrid stroke="#e7ebee" />
              <XAxis dataKey="minute" {...axisProps({ ...x, domain: [0, x.domain[1]] })} tickFormatter={xFmt} label={{ value: 'print time, min', position: 'insideBottom', offset: -8, fontSize: 11 }} />
              <YAxis {...axisProps(y)} tickFormatter={tickFormat(y.step)} label={{ value: 'mm³/s', angle: -90, position: 'insideLeft', fontSize: 11 }} />
              <Tooltip formatter={(v) => `${Number(v).toFixed(1)} mm³/s`} labelFormatter={(m) => `from ${Number(m).toFixed(1)} min`} />
              <Legend verticalAlign="top" height={24} wrapperStyle={{ fontSize: 12 }} />
              <Line type="stepAfter" dataKey="max" name="peak in interval" stroke="#d74707" dot={false} strokeWidth={1.5} isAnimationActive={false} />
              <Line type="stepAfter" dataKey="mean" name="mean in interval" stroke="#159c86" dot={false} strokeWidth={1.5} isAnimationActive={false} />
              {limitMm3s !== null && <ReferenceLine y={limitMm3s} stroke="#b52a2a" strokeDasharray="5 4" label={{ value: `machine limit ${limitMm3s} mm³/s`, position: 'insideTopRight', fontSize: 11, fill: '#922424' }} />}
            </LineChart>
          </ResponsiveContainer>
        </div>
      )}
    </figure>
  );
}
