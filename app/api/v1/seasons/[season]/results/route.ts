import { route } from '@/lib/http';
import { badRequest } from '@/lib/errors';
import { CACHE_FROZEN, CACHE_LIVE, versionedResponse } from '@/lib/standings/http';
import { parseSlug, seasonResults } from '@/lib/standings/views';
import { seasonResultsCsv } from '@/lib/standings/csv';

/**
 * GET /api/v1/seasons/{season}/results — the whole season's standings, every class in one CSV
 * (a `class` column first). Public like each class's CSV (published seasons only); built once per
 * standings version and answered from the kept copy (ETag, 304) until a change bumps it.
 */
export const GET = route(async (req, ctx: { params: Promise<{ season: string }> }) => {
  const season = parseSlug((await ctx.params).season, 'season');
  // One answer per season: no parameters (a query string would only add copies to the kept answers).
  const extra = [...new URL(req.url).searchParams.keys()];
  if (extra.length) throw badRequest(`The season's results take no parameters (got "${extra[0]}"); filter a class's standings instead.`, { [extra[0]]: 'Unknown parameter.' });
  return versionedResponse(req, async () => {
    const results = await seasonResults(season);
    return {
      body: seasonResultsCsv(results.classes),
      contentType: 'text/csv; charset=utf-8',
      policy: results.season.frozen ? CACHE_FROZEN : CACHE_LIVE,
      extra: { 'Content-Disposition': `attachment; filename="${season}-results.csv"` },
    };
  });
});
