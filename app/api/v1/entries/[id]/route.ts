import { route } from '@/lib/http';
import { CACHE_LIVE, jsonAnswer, versionedResponse } from '@/lib/standings/http';
import { parseId, publicEntry } from '@/lib/standings/views';
import { rejectQuery } from '@/lib/standings/apiParams';

/** GET /api/v1/entries/{id} — a verified entry with its inspection summary; others answer 404. */
export const GET = route(async (req, ctx: { params: Promise<{ id: string }> }) => {
  rejectQuery(req);
  const { id } = await ctx.params;
  return versionedResponse(req, async () => jsonAnswer({ entry: await publicEntry(parseId(id, 'entry')) }, CACHE_LIVE));
});
