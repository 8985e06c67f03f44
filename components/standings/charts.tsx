'use client';
/** Recharts plots for the public pages. Data arrive ready to draw; these components only lay them out. */
import { Bar, BarChart, CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis, ZAxis } from 'recharts';
import { formatDurationMs } from '@/lib/format';

/** Series colours from our palette (tailwind.config.ts): ember, coolant, ink, alarm. */
const SERIES = ['#d74707', '#0d7f6e', '#3e4954', '#b52a2a', '#fd8034', '#159c86'];
const minutes = (s: number) => formatDurationMs(s * 1000).replace(/\.\d$/, '');

function Frame({ title, children, empty, testId }: { title: string; children: React.ReactElement; empty?: boolean; testId?: string }) {
  return (
    <figure className="card" data-testid={testId}>
      <figcaption className="mb-3 font-semibold text-ink-800">{title}</figcaption>
      {empty ? <p className="text-sm text-ink-600">No verified entries yet.</p> : <div className="h-72 w-full"><ResponsiveContainer width="100%" height="100%">{children}</ResponsiveContainer></div>}
    </figure>
  );
}

export function TimesHistogram({ bins, classes }: { bins: Record<string, number>[]; classes: { slug: string; name: string }[] }) {
  const data = bins.map((b) => ({ ...b, label: `${minutes(b.from_s)}–${minutes(b.to_s)}` }));
  return (
    <Frame title="Distribution of ranked times per class" testId="chart-histogram" empty={!bins.length}>
      <BarChart data={data} margin={{ top: 5, right: 20, bottom: 20, left: 10 }}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="label" tick={{ fontSize: 11 }} />
        <YAxis allowDecimals={false} label={{ value: 'entrants', angle: -90, position: 'insideLeft' }} />
        <Tooltip />
        <Legend verticalAlign="top" />
        {classes.map((c, i) => <Bar key={c.slug} dataKey={c.slug} name={c.name} stackId="t" fill={SERIES[i % SERIES.length]} isAnimationActive={false} />)}
      </BarChart>
    </Frame>
  );
}

export function FlowScatter({ series }: { series: { slug: string; name: string; points: { time_s: number; peak_flow_mm3s: number; entrant: string }[] }[] }) {
  return (
    <Frame title="Claimed time against peak flow (does more flow buy speed?)" testId="chart-scatter" empty={!series.some((s) => s.points.length)}>
      <ScatterChart margin={{ top: 5, right: 20, bottom: 20, left: 10 }}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="peak_flow_mm3s" type="number" name="peak flow" unit=" mm³/s" domain={['auto', 'auto']} />
        <YAxis dataKey="time_s" type="number" name="time" tickFormatter={minutes} domain={['auto', 'auto']} />
        <ZAxis range={[30, 30]} />
        <Tooltip formatter={(v, name) => (name === 'time' ? minutes(Number(v)) : `${Number(v).toFixed(1)} mm³/s`)} />
        <Legend verticalAlign="top" />
        {series.map((s, i) => <Scatter key={s.slug} name={s.name} data={s.points} fill={SERIES[i % SERIES.length]} isAnimationActive={false} />)}
      </ScatterChart>
    </Frame>
  );
}

export function EntriesTimeline({ days }: { days: { day: string; submitted_total: number; verified_total: number }[] }) {
  return (
    <Frame title="Entries over the season (running totals)" testId="chart-timeline" empty={!days.length}>
      <LineChart data={days} margin={{ top: 5, right: 20, bottom: 20, left: 10 }}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="day" tick={{ fontSize: 11 }} />
        <YAxis allowDecimals={false} />
        <Tooltip />
        <Legend verticalAlign="top" />
        <Line type="monotone" dataKey="submitted_total" name="submitted" stroke={SERIES[0]} dot={false} isAnimationActive={false} />
        <Line type="monotone" dataKey="verified_total" name="verified" stroke={SERIES[1]} dot={false} isAnimationActive={false} />
      </LineChart>
    </Frame>
  );
}

export function TimesOverSeasons({ points }: { points: { season: string; class: string; time_s: number; rank: number | null }[] }) {
  const data = points.map((p) => ({ ...p, label: `${p.season} · ${p.class}` }));
  return (
    <Frame title="Best verified time per season" testId="chart-seasons" empty={!points.length}>
      <LineChart data={data} margin={{ top: 5, right: 20, bottom: 20, left: 10 }}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="label" tick={{ fontSize: 11 }} />
        <YAxis tickFormatter={minutes} domain={['auto', 'auto']} />
        <Tooltip formatter={(v) => minutes(Number(v))} />
        <Line type="monotone" dataKey="time_s" name="best time" stroke={SERIES[0]} isAnimationActive={false} />
      </LineChart>
    </Frame>
  );
}
