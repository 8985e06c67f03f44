'use client';
/**
 * Volumetric flow over print time, from an inspection's time series (fixed buckets: max and mean
 * commanded flow per bucket). Reusable by the entrant, judging and public pages: give it the
 * series, optionally the machine's measured extrusion limit to draw as a line.
 */
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';

export interface FlowSeriesProps {
  bucketS: number;
  maxMm3s: number[];
  meanMm3s: number[];
}

export function FlowChart({ series, limitMm3s = null, height = 260, title = 'Flow over time' }: { series: FlowSeriesProps; limitMm3s?: number | null; height?: number; title?: string }) {
  const data = series.maxMm3s.map((max, i) => ({ minute: Math.round(((i + 0.5) * series.bucketS) / 6) / 10, max, mean: series.meanMm3s[i] ?? 0 }));
  const peak = Math.max(0, ...series.maxMm3s, limitMm3s ?? 0);
  return (
    <figure className="w-full" data-testid="flow-chart">
      <figcaption className="mb-1 text-sm font-semibold text-ink-700">{title}</figcaption>
      {data.length === 0 ? (
        <p className="text-sm text-ink-500">No extruding moves to chart.</p>
      ) : (
        <div style={{ width: '100%', height }}>
          <ResponsiveContainer width="100%" height="100%">
            <LineChart data={data} margin={{ top: 8, right: 16, bottom: 16, left: 0 }}>
              <CartesianGrid stroke="#e7ebee" />
              <XAxis dataKey="minute" type="number" domain={[0, 'dataMax']} tick={{ fontSize: 11 }} label={{ value: 'print time, min', position: 'insideBottom', offset: -8, fontSize: 11 }} />
              <YAxis domain={[0, Math.ceil(peak * 1.1)]} tick={{ fontSize: 11 }} label={{ value: 'mm³/s', angle: -90, position: 'insideLeft', fontSize: 11 }} />
              <Tooltip formatter={(v) => `${Number(v).toFixed(1)} mm³/s`} labelFormatter={(m) => `${m} min`} />
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
