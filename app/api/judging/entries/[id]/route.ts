import { route, parseInput, clientIp } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { entryReview } from '@/lib/reviews/entry';
import { EntryParams } from '@/lib/reviews/params';

/** GET /api/judging/entries/:id — the review screen's data (audited as a view of private evidence). */
export const GET = route<{ params: Promise<{ id: string }> }>(async (req, ctx) => {
  const judge = await requireRole('judge');
  const { id } = parseInput(EntryParams, await ctx.params);
  return Response.json(await entryReview(judge.id, id, { ip: clientIp(req.headers) }));
});
