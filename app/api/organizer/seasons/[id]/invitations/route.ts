import { route, readBody, parseInput, clientIp } from '@/lib/http';
import { countMailRequest } from '@/lib/auth/limits';
import { inviteJudge, managedSeason, requireOrganizer } from '@/lib/seasons';
import { JudgeByEmailSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const { email } = await readBody(req, JudgeByEmailSchema);
  // Each invitation is a mail: the same per-address and per-recipient limits as the account mails.
  await countMailRequest(email, clientIp(req.headers));
  const invitation = await inviteJudge(actor, id, email);
  return Response.json({ invitation, message: `Invitation sent to ${email}.` }, { status: 201 });
});
