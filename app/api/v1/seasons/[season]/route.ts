import { route } from '@/lib/http';
import { cachedJson, CACHE_FROZEN, CACHE_LIVE } from '@/lib/standings/http';
import { parseSlug, seasonDetail } from '@/lib/standings/views';
import { rejectQuery } from '@/lib/standings/apiParams';

/** GET /api/v1/seasons/{season} — one season with its classes and rulebook. */
export const GET = route(async (req, ctx: { params: Promise<{ season: string }> }) => {
  rejectQuery(req);
  const { season } = await ctx.params;
  const body = await seasonDetail(parseSlug(season, 'season'));
  return cachedJson(req, body, body.season.frozen ? CACHE_FROZEN : CACHE_LIVE);
});
