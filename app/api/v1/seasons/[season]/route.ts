import { route } from '@/lib/http';
import { CACHE_FROZEN, CACHE_LIVE, jsonAnswer, versionedResponse } from '@/lib/standings/http';
import { parseSlug, seasonDetail } from '@/lib/standings/views';
import { rejectQuery } from '@/lib/standings/apiParams';

/** GET /api/v1/seasons/{season} — one season with its classes and rulebook. */
export const GET = route(async (req, ctx: { params: Promise<{ season: string }> }) => {
  rejectQuery(req);
  const { season } = await ctx.params;
  const slug = parseSlug(season, 'season');
  return versionedResponse(req, async () => {
    const body = await seasonDetail(slug);
    return jsonAnswer(body, body.season.frozen ? CACHE_FROZEN : CACHE_LIVE);
  });
});
