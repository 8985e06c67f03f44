'use client';
/**
 * Extrusion efficiency against volumetric rate, with the pass threshold and the limit found. Each
 * point is one measured step of the test, so points are marked and joined straight (a measurement
 * between steps is not known; the line only guides the eye).
 */
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { niceTicks } from '@/lib/charts/niceTicks';
import { axisProps, tickFormat } from './axes';

export function EfficiencyChart({ steps, thresholdPercent, limitMm3s, height = 240 }: { steps: { rateMm3s: number; efficiencyPercent: number }[]; thresholdPercent: number; limitMm3s: number | null; height?: number }) {
  const data = steps.map((s) => ({ rate: s.rateMm3s, efficiency: Math.round(s.efficiencyPercent * 10) / 10 }));
  const x = niceTicks(0, Math.max(1, ...data.map((d) => d.rate), limitMm3s ?? 0), 6);
  const y = niceTicks(Math.min(thresholdPercent - 4, ...data.map((d) => d.efficiency)), Math.max(100, ...data.map((d) => d.efficiency)), 5);
  return (
    <figure className="w-full" data-testid="efficiency-chart">
      <figcaption className="mb-1 text-sm font-semibold text-ink-700">Efficiency by rate</figcaption>
      <div style={{ width: '100%', height }}>
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={data} margin={{ top: 8, right: 16, bottom: 16, left: 0 }}>
            <CartesianGrid stroke="#e7ebee" />
            <XAxis dataKey="rate" {...axisProps(x)} tickFormatter={tickFormat(x.step)} label={{ value: 'rate, mm³/s', position: 'insideBottom', offset: -8, fontSize: 11 }} />
            <YAxis {...axisProps(y)} tickFormatter={tickFormat(y.step)} label={{ value: '%', angle: -90, position: 'insideLeft', fontSize: 11 }} />
            <Tooltip formatter={(v) => `${v} %`} labelFormatter={(r) => `${r} mm³/s`} />
            <ReferenceLine y={thresholdPercent} stroke="#b52a2a" strokeDasharray="5 4" label={{ value: `threshold ${thresholdPercent} %`, position: 'insideBottomLeft', fontSize: 11, fill: '#922424' }} />
            {limitMm3s !== null && <ReferenceLine x={limitMm3s} stroke="#0d7f6e" strokeDasharray="3 3" label={{ value: `limit ${limitMm3s}`, position: 'insideTopLeft', fontSize: 11, fill: '#0e665a' }} />}
            <Line type="linear" dataKey="efficiency" name="efficiency" stroke="#d74707" strokeWidth={2} dot={{ r: 3 }} isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
