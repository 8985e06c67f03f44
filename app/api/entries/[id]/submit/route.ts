import { route, parseInput } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { submitEntry } from '@/lib/entries';
import { IdParams } from '@/lib/entries/schema';

export const POST = route<{ params: Promise<{ id: string }> }>(async (_req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(await submitEntry(user, id));
});
