'use client';
/**
 * Recharts plots for the public pages. Data arrive ready to draw; these components lay them out with
 * round ticks (lib/charts/niceTicks), every tick labelled, and few enough ticks not to overlap.
 */
import { Bar, BarChart, CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis, ZAxis } from 'recharts';
import { formatDurationMs } from '@/lib/format';
import { niceDayTicks, niceTicks, niceTimeTicks } from '@/lib/charts/niceTicks';
import { axisProps, TICK, tickFormat } from '@/components/charts/axes';

/** Series colours from our palette (tailwind.config.ts): ember, coolant, ink, alarm. */
const SERIES = ['#d74707', '#0d7f6e', '#3e4954', '#b52a2a', '#fd8034', '#159c86'];
const minutes = (s: number) => formatDurationMs(s * 1000).replace(/\.\d$/, '');
const dayLabel = (ms: number) => new Date(ms).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', timeZone: 'UTC' });
const monthLabel = (ms: number) => new Date(ms).toLocaleDateString('en-GB', { month: 'short', year: 'numeric', timeZone: 'UTC' });

function Frame({ title, children, empty, testId, note }: { title: string; children: React.ReactElement; empty?: boolean; testId?: string; note?: string }) {
  return (
    <figure className="card" data-testid={testId}>
      <figcaption className="mb-3 font-semibold text-ink-800">{title}</figcaption>
      {empty ? <p className="text-sm text-ink-600">No verified entries yet.</p> : <div className="h-72 w-full"><ResponsiveContainer width="100%" height="100%">{children}</ResponsiveContainer></div>}
      {note && !empty && <p className="mt-2 text-xs text-ink-600">{note}</p>}
    </figure>
  );
}

export function TimesHistogram({ bins, classes }: { bins: Record<string, number>[]; classes: { slug: string; name: string }[] }) {
  // Bars sit on a numeric time axis at their bin's centre; ticks at round times, so labels never crowd.
  const data = bins.map((b) => ({ ...b, mid: (b.from_s + b.to_s) / 2, range: `${minutes(b.from_s)}–${minutes(b.to_s)}` }));
  const x = bins.length ? niceTimeTicks(bins[0].from_s, bins[bins.length - 1].to_s, 4) : niceTimeTicks(0, 60);
  const maxCount = Math.max(1, ...bins.map((b) => classes.reduce((s, c) => s + (b[c.slug] ?? 0), 0)));
  const y = niceTicks(0, maxCount, 4, { integer: true });
  return (
    <Frame title="Distribution of ranked times per class" testId="chart-histogram" empty={!bins.length}>
      <BarChart data={data} margin={{ top: 14, right: 20, bottom: 20, left: 10 }} barCategoryGap={1}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="mid" {...axisProps(x)} tickFormatter={minutes} label={{ value: 'claimed time', position: 'insideBottom', offset: -12, fontSize: 11 }} />
        <YAxis {...axisProps(y)} allowDecimals={false} label={{ value: 'entrants', angle: -90, position: 'insideLeft', fontSize: 11 }} />
        <Tooltip labelFormatter={(_, p) => String(p?.[0]?.payload?.range ?? '')} />
        <Legend verticalAlign="top" />
        {classes.map((c, i) => <Bar key={c.slug} dataKey={c.slug} name={c.name} stackId="t" fill={SERIES[i % SERIES.length]} isAnimationActive={false} />)}
      </BarChart>
    </Frame>
  );
}

export function FlowScatter({ series }: { series: { slug: string; name: string; points: { time_s: number; peak_flow_mm3s: number; entrant: string }[] }[] }) {
  const all = series.flatMap((s) => s.points);
  const x = niceTicks(Math.min(...all.map((p) => p.peak_flow_mm3s)), Math.max(...all.map((p) => p.peak_flow_mm3s)), 6);
  const y = niceTimeTicks(Math.min(...all.map((p) => p.time_s)), Math.max(...all.map((p) => p.time_s)), 5);
  return (
    <Frame title="Claimed time against peak flow (does more flow buy speed?)" testId="chart-scatter" empty={!all.length}>
      <ScatterChart margin={{ top: 14, right: 20, bottom: 20, left: 10 }}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="peak_flow_mm3s" name="peak flow" {...axisProps(x)} tickFormatter={tickFormat(x.step)} label={{ value: 'peak flow, mm³/s', position: 'insideBottom', offset: -12, fontSize: 11 }} />
        <YAxis dataKey="time_s" name="time" {...axisProps(y)} tickFormatter={minutes} />
        <ZAxis range={[30, 30]} />
        <Tooltip formatter={(v, name) => (name === 'time' ? minutes(Number(v)) : `${Number(v).toFixed(1)} mm³/s`)} />
        <Legend verticalAlign="top" />
        {series.map((s, i) => <Scatter key={s.slug} name={s.name} data={s.points} fill={SERIES[i % SERIES.length]} isAnimationActive={false} />)}
      </ScatterChart>
    </Frame>
  );
}

export function EntriesTimeline({ days }: { days: { day: string; submitted_total: number; verified_total: number }[] }) {
  // Running totals change only on the days something happened: step data, drawn as steps on a date axis.
  const data = days.map((d) => ({ ...d, t: Date.parse(`${d.day.slice(0, 10)}T00:00:00Z`) })).filter((d) => Number.isFinite(d.t));
  const x = data.length ? niceDayTicks(data[0].t, data[data.length - 1].t, 6) : niceDayTicks(0, 86_400_000);
  const y = niceTicks(0, Math.max(1, ...data.map((d) => d.submitted_total)), 4, { integer: true });
  const label = x.step >= 28 * 86_400_000 ? monthLabel : dayLabel;
  return (
    <Frame title="Entries over the season (running totals)" testId="chart-timeline" empty={!data.length}>
      <LineChart data={data} margin={{ top: 14, right: 32, bottom: 20, left: 10 }}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="t" {...axisProps(x)} scale="time" tickFormatter={label} />
        <YAxis {...axisProps(y)} allowDecimals={false} />
        <Tooltip labelFormatter={(t) => dayLabel(Number(t))} />
        <Legend verticalAlign="top" />
        <Line type="stepAfter" dataKey="submitted_total" name="submitted" stroke={SERIES[0]} dot={false} isAnimationActive={false} />
        <Line type="stepAfter" dataKey="verified_total" name="verified" stroke={SERIES[1]} dot={false} isAnimationActive={false} />
      </LineChart>
    </Frame>
  );
}

export interface SeasonPoint {
  season: string;
  opens_at: string | null;
  class: string;
  piece: { key: string; name: string };
  time_s: number;
  rank: number | null;
}

/**
 * Best verified time per season, one line per test piece: times on different pieces are not
 * comparable, so no line joins them. Seasons sit on a date axis (their opening day).
 */
export function TimesOverSeasons({ points }: { points: SeasonPoint[] }) {
  const withT = points.map((p) => ({ ...p, t: p.opens_at ? Date.parse(p.opens_at) : NaN })).filter((p) => Number.isFinite(p.t));
  const pieces = [...new Map(withT.map((p) => [p.piece.key, p.piece])).values()];
  const x = withT.length ? niceDayTicks(Math.min(...withT.map((p) => p.t)), Math.max(...withT.map((p) => p.t)), 5) : niceDayTicks(0, 86_400_000);
  const y = niceTimeTicks(Math.min(...withT.map((p) => p.time_s)), Math.max(...withT.map((p) => p.time_s)), 5);
  const label = x.step >= 28 * 86_400_000 ? monthLabel : dayLabel;
  return (
    <Frame
      title="Best verified time per season, by test piece"
      testId="chart-seasons"
      empty={!withT.length}
      note={pieces.length > 1 ? 'Each test piece is its own line: times on different pieces are not compared.' : undefined}
    >
      <LineChart margin={{ top: 14, right: 32, bottom: 20, left: 10 }}>
        <CartesianGrid strokeDasharray="3 3" stroke="#e7ebee" />
        <XAxis dataKey="t" {...axisProps(x)} scale="time" tickFormatter={label} tick={TICK} label={{ value: 'season opening', position: 'insideBottom', offset: -12, fontSize: 11 }} />
        <YAxis dataKey="time_s" {...axisProps(y)} tickFormatter={minutes} />
        <Tooltip
          formatter={(v) => minutes(Number(v))}
          labelFormatter={(_, p) => {
            const d = p?.[0]?.payload as SeasonPoint | undefined;
            return d ? `${d.season} · ${d.class} · ${d.piece.name}` : '';
          }}
        />
        <Legend verticalAlign="top" />
        {pieces.map((piece, i) => (
          <Line
            key={piece.key}
            data={withT.filter((p) => p.piece.key === piece.key).sort((a, b) => a.t - b.t)}
            dataKey="time_s"
            name={piece.name}
            stroke={SERIES[i % SERIES.length]}
            dot={{ r: 4 }}
            isAnimationActive={false}
            data-testid="season-series"
          />
        ))}
      </LineChart>
    </Frame>
  );
}
