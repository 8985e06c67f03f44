import { route, parseInput } from '@/lib/http';
import { managedSeason, removeCoOrganizer, requireOrganizer } from '@/lib/seasons';
import { OrganizerParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string; userId: string }> };

export const DELETE = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id, userId } = parseInput(OrganizerParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  await removeCoOrganizer(actor, id, userId);
  return Response.json({ message: 'Co-organizer removed from this season.' });
});
