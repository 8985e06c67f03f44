import { route, readBody, parseInput } from '@/lib/http';
import { inviteJudge, managedSeason, requireOrganizer } from '@/lib/seasons';
import { JudgeByEmailSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const { email } = await readBody(req, JudgeByEmailSchema);
  const invitation = await inviteJudge(actor, id, email);
  return Response.json({ invitation, message: `Invitation sent to ${email}.` }, { status: 201 });
});
