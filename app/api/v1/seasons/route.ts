import { route } from '@/lib/http';
import { CACHE_LIVE, jsonAnswer, versionedResponse } from '@/lib/standings/http';
import { seasonsList } from '@/lib/standings/views';
import { rejectQuery } from '@/lib/standings/apiParams';

/** GET /api/v1/seasons — every published season with its classes. */
export const GET = route(async (req) => {
  rejectQuery(req);
  return versionedResponse(req, async () => jsonAnswer(await seasonsList(), CACHE_LIVE));
});
