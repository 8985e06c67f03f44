import { route } from '@/lib/http';
import { badRequest } from '@/lib/errors';
import { CACHE_LIVE, jsonAnswer, versionedResponse } from '@/lib/standings/http';
import { parseSlug } from '@/lib/standings/views';
import { keptSeasonOverview } from '@/lib/standings/overview';

/**
 * GET /api/v1/seasons/{season}/overview — what the season overview charts draw: a histogram of
 * ranked times per class, each class's peak flow against time (sampled), and entries by day. The
 * overview page's charts read it after the page has loaded. Public like the standings (published
 * seasons only); built once per standings version and answered from the kept copy (ETag, 304).
 */
export const GET = route(async (req, ctx: { params: Promise<{ season: string }> }) => {
  const season = parseSlug((await ctx.params).season, 'season');
  const extra = [...new URL(req.url).searchParams.keys()];
  if (extra.length) throw badRequest(`The season overview takes no parameters (got "${extra[0]}").`, { [extra[0]]: 'Unknown parameter.' });
  return versionedResponse(req, async () => jsonAnswer(await keptSeasonOverview(season), CACHE_LIVE));
});
