/** Figures for the season overview charts: time distribution per class, time vs peak flow, entries over time. */
import { QueryTypes } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { utcDaySql } from '@/lib/dbDialect';
import { DEFAULT_QUERY } from './params';
import { classRef, findSeason, seasonClasses, type ClassStandings } from './views';
import { isoDate, standingsPage, type StandingsRow } from './query';
import { keptForVersion } from './publicCache';

/** Round bin widths (1, 2 or 5 × 10ⁿ) keep histogram edges at readable times; one definition for bins and axes. */
import { niceStep } from '@/lib/charts/niceTicks';
export { niceStep };

export interface HistogramBin {
  from_s: number;
  to_s: number;
  [classSlug: string]: number;
}

/** Counts of ranked times per class in shared bins of a nice width (about `target` bins). */
export function timeHistogram(byClass: Record<string, number[]>, target = 12): HistogramBin[] {
  const all = Object.values(byClass).flat();
  if (!all.length) return [];
  const min = Math.min(...all);
  const max = Math.max(...all);
  const step = niceStep((max - min) / target || 1);
  const start = Math.floor(min / step) * step;
  const n = Math.max(1, Math.floor((max - start) / step) + 1);
  const bins: HistogramBin[] = Array.from({ length: n }, (_, i) => ({ from_s: start + i * step, to_s: start + (i + 1) * step }) as HistogramBin);
  for (const [slug, times] of Object.entries(byClass)) {
    for (const b of bins) b[slug] = 0;
    for (const t of times) bins[Math.min(n - 1, Math.floor((t - start) / step))][slug]++;
  }
  return bins;
}

/** Evenly spaced sample of at most `max` items, so a scatter of thousands stays drawable. */
export function sample<T>(xs: T[], max: number): T[] {
  if (xs.length <= max) return xs;
  const out: T[] = [];
  for (let i = 0; i < max; i++) out.push(xs[Math.floor((i * xs.length) / max)]);
  return out;
}

export async function seasonOverview(slug: string) {
  const season = await findSeason(slug);
  const classes = await seasonClasses(season.id);
  const ranked: { slug: string; name: string; rows: StandingsRow[] }[] = [];
  for (const c of classes) {
    const ref = await classRef(season, c);
    ranked.push({ slug: c.slug, name: c.name, rows: (await standingsPage(ref, DEFAULT_QUERY, { all: true })).rows });
  }
  const histogram = timeHistogram(Object.fromEntries(ranked.map((c) => [c.slug, c.rows.map((r) => r.time_ms / 1000)])));
  const scatter = ranked.map((c) => ({
    slug: c.slug,
    name: c.name,
    points: sample(c.rows.filter((r) => r.peak_flow_mm3s != null), 1500).map((r) => ({ time_s: r.time_ms / 1000, peak_flow_mm3s: r.peak_flow_mm3s as number, entrant: r.entrant, rank: r.rank })),
  }));
  // Entries over the season: submissions by day, and verifications by the day of decision.
  const seq = getSequelize();
  const days = await seq.query<{ day: string; submitted: number; verified: number }>(
    `SELECT day, SUM(sub) AS submitted, SUM(ver) AS verified FROM (
       SELECT ${utcDaySql(seq, 'submitted_at')} AS day, 1 AS sub, 0 AS ver FROM entries WHERE season_id = ? AND submitted_at IS NOT NULL AND state <> 'draft'
       UNION ALL
       SELECT ${utcDaySql(seq, 'decided_at')}, 0, 1 FROM entries WHERE season_id = ? AND state = 'verified' AND decided_at IS NOT NULL
     ) AS d GROUP BY day ORDER BY day`,
    { replacements: [season.id, season.id], type: QueryTypes.SELECT },
  );
  let sub = 0;
  let ver = 0;
  const timeline = days.map((d) => ({ day: d.day, submitted: Number(d.submitted), verified: Number(d.verified), submitted_total: (sub += Number(d.submitted)), verified_total: (ver += Number(d.verified)) }));
  return {
    season: { slug: season.slug, name: season.name, state: season.state, opens_at: isoDate(season.opens_at), closes_at: isoDate(season.closes_at) },
    classes: ranked.map((c) => ({ slug: c.slug, name: c.name, ranked: c.rows.length })),
    histogram,
    scatter,
    timeline,
  };
}

export type SeasonOverview = Awaited<ReturnType<typeof seasonOverview>>;

/** The overview kept per standings version: the page's text and the charts' API answer share one build. */
export const keptSeasonOverview = (slug: string): Promise<SeasonOverview> => keptForVersion(`overview:${slug}`, () => seasonOverview(slug));

export type { ClassStandings };
