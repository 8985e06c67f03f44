import { route, parseInput, readBody, clientIp } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { decide } from '@/lib/reviews/decide';
import { DecisionSchema } from '@/lib/reviews/schemas';
import { EntryParams } from '@/lib/reviews/params';

/** POST /api/judging/entries/:id/decisions — verify, reject or return, with reasons and a note. */
export const POST = route<{ params: Promise<{ id: string }> }>(async (req, ctx) => {
  const judge = await requireRole('judge');
  const { id } = parseInput(EntryParams, await ctx.params);
  const input = await readBody(req, DecisionSchema);
  return Response.json(await decide(judge.id, id, input, { ip: clientIp(req.headers) }), { status: 201 });
});
