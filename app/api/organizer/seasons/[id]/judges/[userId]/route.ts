import { route, parseInput } from '@/lib/http';
import { managedSeason, removeJudge, requireOrganizer } from '@/lib/seasons';
import { JudgeParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string; userId: string }> };

export const DELETE = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id, userId } = parseInput(JudgeParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  await removeJudge(actor, id, userId);
  return Response.json({ message: 'Judge removed from this season.' });
});
