import { route } from '@/lib/http';
import { cachedJson, CACHE_LIVE } from '@/lib/standings/http';
import { parseSlug } from '@/lib/standings/views';
import { rejectQuery } from '@/lib/standings/apiParams';
import { checkRulebook } from '@/lib/check/rulebook';

/** GET /api/v1/seasons/{season}/check-rules — each class's effective rules in the engine's shape, for the in-browser check. */
export const GET = route(async (req, ctx: { params: Promise<{ season: string }> }) => {
  rejectQuery(req);
  const { season } = await ctx.params;
  return cachedJson(req, await checkRulebook(parseSlug(season, 'season')), CACHE_LIVE);
});
