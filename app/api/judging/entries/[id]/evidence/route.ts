import { route, parseInput, clientIp } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { evidenceLink } from '@/lib/reviews/evidence';
import { EntryParams } from '@/lib/reviews/params';

/** GET /api/judging/entries/:id/evidence — audits the view, then sends the judge to the entrant's evidence link. */
export const GET = route<{ params: Promise<{ id: string }> }>(async (req, ctx) => {
  const judge = await requireRole('judge');
  const { id } = parseInput(EntryParams, await ctx.params);
  const url = await evidenceLink(judge.id, id, clientIp(req.headers));
  return new Response(null, { status: 302, headers: { location: url, 'referrer-policy': 'no-referrer' } });
});
