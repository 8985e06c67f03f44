import Link from 'next/link';
import { connection } from 'next/server';
import { QueryTypes } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { DEFAULT_QUERY, PER_PAGE_DEFAULT, PER_PAGE_MAX, Q_MAX_LENGTH, SORT_KEYS } from '@/lib/standings/params';
import { classStandings, publicEntry, seasonDetail, seasonsList } from '@/lib/standings/views';
import { MATERIAL_FAMILIES } from '@/lib/inspection/materials';
import { MOTION_SYSTEMS } from '@/lib/domain';
import { CACHE_FROZEN, CACHE_LIVE } from '@/lib/standings/http';

export const metadata = { title: 'API' };

/** Shortens long arrays in an example so it stays readable. */
function trim(v: unknown, depth = 0): unknown {
  if (Array.isArray(v)) {
    const head = v.slice(0, depth === 0 ? 3 : 2).map((x) => trim(x, depth + 1));
    return v.length > head.length ? [...head, `… ${v.length - head.length} more`] : head;
  }
  if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, trim(x, depth + 1)]));
  return v;
}

async function examples() {
  const list = await seasonsList();
  const first = list.seasons.find((s) => s.classes.length);
  if (!first) return null;
  const [cls] = (await getSequelize().query<{ season: string; class: string }>(
    `SELECT s.slug AS season, c.slug AS class FROM entries e JOIN seasons s ON s.id = e.season_id JOIN classes c ON c.id = e.class_id
     WHERE e.state = 'verified' AND s.state <> 'draft' ORDER BY s.opens_at DESC, e.id LIMIT 1`,
    { type: QueryTypes.SELECT },
  )) ?? [{ season: first.slug, class: first.classes[0].slug }];
  const standings = await classStandings(cls?.season ?? first.slug, cls?.class ?? first.classes[0].slug, { ...DEFAULT_QUERY, perPage: 3 });
  const entryId = standings.page.rows[0]?.entry_id;
  return {
    seasonSlug: standings.season.slug,
    classSlug: standings.class.slug,
    entryId,
    list,
    season: await seasonDetail(standings.season.slug),
    standings: { season: standings.season, class: standings.class, ...standings.page },
    entry: entryId ? { entry: await publicEntry(entryId) } : null,
  };
}

function Example({ data }: { data: unknown }) {
  return <pre className="mt-2 max-h-96 overflow-auto rounded-lg bg-ink-900 p-4 text-xs text-ink-50"><code>{JSON.stringify(trim(data), null, 2)}</code></pre>;
}

export default async function ApiDocsPage() {
  await connection();
  const ex = await examples();
  const s = ex?.seasonSlug ?? 'SEASON';
  const c = ex?.classSlug ?? 'CLASS';
  return (
    <div className="max-w-4xl space-y-8">
      <header className="space-y-2">
        <h1>Public API, version 1</h1>
        <p className="text-ink-700">
          Read-only JSON over HTTP GET, no sign-in. Every answer carries an <code>ETag</code>; send it back in <code>If-None-Match</code> and an unchanged resource answers
          <strong> 304 Not Modified</strong> with no body. On live seasons <code>Cache-Control</code> asks for revalidation every time
          (<code>max-age={CACHE_LIVE.maxAgeS}, must-revalidate</code>: the answer changes with the next judge’s decision, and a 304 is cheap); final seasons, whose
          standings are frozen, may be reused for {CACHE_FROZEN.maxAgeS} s. Errors are JSON <code>{'{ "error": "…", "fields": { "param": "…" } }'}</code>: 400 for a bad parameter (the message names it), 404 for an
          unknown season, class or entry. Dates are ISO 8601 in UTC; times in milliseconds; flows in mm³/s. Examples below are live answers of this server, shortened.
        </p>
      </header>

      <section>
        <h2><code>GET /api/v1/seasons</code></h2>
        <p className="text-ink-700">Every published season, newest first, with its classes.</p>
        {ex && <Example data={ex.list} />}
      </section>

      <section>
        <h2><code>GET /api/v1/seasons/{'{season}'}</code></h2>
        <p className="text-ink-700">One season by slug, with its test piece, its rulebook (each rule also as a sentence) and its classes with their eligibility and added rules.</p>
        {ex && <Example data={ex.season} />}
      </section>

      <section>
        <h2><code>GET /api/v1/seasons/{'{season}'}/classes/{'{class}'}/standings</code></h2>
        <p className="text-ink-700">The best verified entry of each entrant, ranked by claimed time (ties to the earlier submission). Filters select among ranked rows; <code>rank</code> stays the class rank.</p>
        <table className="table card mt-2">
          <thead><tr><th>parameter</th><th>values</th><th>default</th></tr></thead>
          <tbody>
            <tr><td><code>page</code></td><td>whole number ≥ 1</td><td>1</td></tr>
            <tr><td><code>per_page</code></td><td>1 – {PER_PAGE_MAX}</td><td>{PER_PAGE_DEFAULT}</td></tr>
            <tr><td><code>sort</code></td><td>{SORT_KEYS.join(', ')}; prefix <code>-</code> for descending; rows without a figure come last</td><td>rank</td></tr>
            <tr><td><code>material</code></td><td>{MATERIAL_FAMILIES.join(', ')}</td><td>all</td></tr>
            <tr><td><code>motion</code></td><td>{MOTION_SYSTEMS.join(', ')}</td><td>all</td></tr>
            <tr><td><code>q</code></td><td>machine name contains (case-insensitive), at most {Q_MAX_LENGTH} characters</td><td>—</td></tr>
            <tr><td><code>format</code></td><td><code>json</code> or <code>csv</code>: CSV holds the whole filtered, sorted view, or one page when <code>page</code>/<code>per_page</code> is given</td><td>json</td></tr>
          </tbody>
        </table>
        <p className="mt-2 text-sm text-ink-700">Example: <a href={`/api/v1/seasons/${s}/classes/${c}/standings?per_page=3`}><code>/api/v1/seasons/{s}/classes/{c}/standings?per_page=3</code></a> · CSV:{' '}
          <a href={`/api/v1/seasons/${s}/classes/${c}/standings?format=csv`}><code>?format=csv</code></a></p>
        {ex && <Example data={ex.standings} />}
        <p className="mt-2 text-sm text-ink-700">
          An entrant’s other verified prints in the class: <code>GET /api/v1/seasons/{'{season}'}/classes/{'{class}'}/entrants/{'{entrant_id}'}/entries</code>.
        </p>
      </section>

      <section>
        <h2><code>GET /api/v1/seasons/{'{season}'}/results</code></h2>
        <p className="text-ink-700">
          The whole season in one CSV file: every class’s standings one after another, with <code>class</code> and <code>class_name</code> columns first, then the columns of a class’s CSV.
          <code> estimated_time_s</code> is the inspection’s estimate of the time the G-code needs; <code>over_estimate_percent</code> how much longer the claimed time is. No parameters.
        </p>
        <p className="mt-2 text-sm text-ink-700">Example: <a href={`/api/v1/seasons/${s}/results`}><code>/api/v1/seasons/{s}/results</code></a></p>
      </section>

      <section>
        <h2><code>GET /api/v1/seasons/{'{season}'}/overview</code></h2>
        <p className="text-ink-700">
          What the season overview charts draw, ranked prints only: <code>histogram</code> (bins of claimed time, <code>from_s</code>–<code>to_s</code>, a count per class),
          <code> scatter</code> (per class, peak flow in mm³/s against time in seconds; at most 1 500 points a class, evenly sampled by rank),
          <code> timeline</code> (entries submitted and verified by UTC day, with running totals) and <code>classes</code> with their ranked counts. No parameters.
        </p>
        <p className="mt-2 text-sm text-ink-700">Example: <a href={`/api/v1/seasons/${s}/overview`}><code>/api/v1/seasons/{s}/overview</code></a></p>
      </section>

      <section>
        <h2><code>GET /api/v1/entries/{'{id}'}</code></h2>
        <p className="text-ink-700">A verified entry with its machine, rank, inspection figures, a plain-words summary and the flow time series. Unverified entries answer 404. Photos: <code>GET /api/v1/entries/{'{id}'}/photos/{'{photo_id}'}</code>.</p>
        {ex?.entry && <Example data={ex.entry} />}
      </section>
      <p className="text-sm text-ink-600">The standings pages use this API: <Link href="/seasons">browse the seasons</Link>.</p>
    </div>
  );
}
