import { route, parseInput, clientIp } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { entryPreviewJson } from '@/lib/reviews/evidence';
import { EntryParams } from '@/lib/reviews/params';

/** GET /api/judging/entries/:id/preview — compact per-layer toolpath data for the layer viewer. */
export const GET = route<{ params: Promise<{ id: string }> }>(async (req, ctx) => {
  const judge = await requireRole('judge');
  const { id } = parseInput(EntryParams, await ctx.params);
  const json = await entryPreviewJson(judge.id, id, clientIp(req.headers));
  return new Response(json, { headers: { 'content-type': 'application/json', 'cache-control': 'private, max-age=300' } });
});
