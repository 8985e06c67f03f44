import { route, parseInput } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { entryInspection } from '@/lib/entries';
import { IdParams } from '@/lib/entries/schema';

/** The current inspection, for the form to poll while it runs. */
export const GET = route<{ params: Promise<{ id: string }> }>(async (_req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(await entryInspection(user, id), { headers: { 'cache-control': 'no-store' } });
});
