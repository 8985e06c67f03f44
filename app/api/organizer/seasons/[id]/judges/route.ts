import { route, readBody, parseInput } from '@/lib/http';
import { appointJudge, managedSeason, requireOrganizer, seasonJudges } from '@/lib/seasons';
import { JudgeByEmailSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (req, ctx) => {
  await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id);
  return Response.json(await seasonJudges(id));
});

/** Appoints an existing account by its e-mail address. */
export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  const { email } = await readBody(req, JudgeByEmailSchema);
  const judge = await appointJudge(actor, id, email);
  return Response.json({ judge, message: `${judge.name} now judges this season.` }, { status: 201 });
});
