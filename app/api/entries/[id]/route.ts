import { route, parseInput, readBody } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { entryView, updateEntryDetails } from '@/lib/entries';
import { EntryDetailsSchema, IdParams } from '@/lib/entries/schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(await entryView(user, id));
});

export const PUT = route<Ctx>(async (req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(await updateEntryDetails(user, id, await readBody(req, EntryDetailsSchema)));
});
