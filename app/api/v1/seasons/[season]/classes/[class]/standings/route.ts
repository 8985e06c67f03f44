import { route } from '@/lib/http';
import { CACHE_FROZEN, CACHE_LIVE, jsonAnswer, versionedResponse } from '@/lib/standings/http';
import { parseStandingsQuery } from '@/lib/standings/params';
import { classStandings, parseSlug } from '@/lib/standings/views';
import { standingsCsv } from '@/lib/standings/csv';

/**
 * GET /api/v1/seasons/{season}/classes/{class}/standings — ranked rows with page, per_page, sort,
 * material, motion, q; format=csv exports the whole filtered, sorted view (or one page when paged).
 */
export const GET = route(async (req, ctx: { params: Promise<{ season: string; class: string }> }) =>
  // Kept answers are keyed by path and query, and only valid requests are kept: a repeated request
  // is answered (or 304) before any parsing.
  versionedResponse(req, async () => {
    const p = await ctx.params;
    const season = parseSlug(p.season, 'season');
    const cls = parseSlug(p.class, 'class');
    const q = parseStandingsQuery(new URL(req.url).searchParams);
    const csv = q.format === 'csv';
    const view = await classStandings(season, cls, q, { all: csv && !q.paged });
    const policy = view.season.frozen ? CACHE_FROZEN : CACHE_LIVE;
    if (csv) {
      return {
        body: standingsCsv(view.page.rows),
        contentType: 'text/csv; charset=utf-8',
        policy,
        extra: { 'Content-Disposition': `attachment; filename="${season}-${cls}-standings.csv"` },
      };
    }
    const { rows, ...paging } = view.page;
    return jsonAnswer({ season: view.season, class: view.class, ...paging, rows }, policy);
  }),
);
