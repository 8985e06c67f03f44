import { route } from '@/lib/http';
import { CACHE_LIVE, jsonAnswer, versionedResponse } from '@/lib/standings/http';
import { entrantRunsInClass, parseId, parseSlug } from '@/lib/standings/views';
import { rejectQuery } from '@/lib/standings/apiParams';

/** GET …/classes/{class}/entrants/{entrant}/entries — every verified timed print of one entrant in the class. */
export const GET = route(async (req, ctx: { params: Promise<{ season: string; class: string; entrant: string }> }) => {
  rejectQuery(req);
  const p = await ctx.params;
  return versionedResponse(req, async () => jsonAnswer(await entrantRunsInClass(parseSlug(p.season, 'season'), parseSlug(p.class, 'class'), parseId(p.entrant, 'entrant')), CACHE_LIVE));
});
