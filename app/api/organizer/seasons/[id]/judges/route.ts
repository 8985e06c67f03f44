import { route, readBody, parseInput } from '@/lib/http';
import { appointJudge, managedSeason, requireOrganizer, seasonJudges } from '@/lib/seasons';
import { JudgeByEmailSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  return Response.json(await seasonJudges(id));
});

/** Appoints an existing account by its e-mail address. */
export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const { email } = await readBody(req, JudgeByEmailSchema);
  const judge = await appointJudge(actor, id, email);
  const note = judge.conflicts.length
    ? ` ${judge.name} competes in ${judge.conflicts.map((c) => c.name).join(', ')}: entries of ${judge.conflicts.length === 1 ? 'that class' : 'those classes'} are left off their desk and decided by other judges.`
    : '';
  return Response.json({ judge, message: `${judge.name} now judges this season.${note}` }, { status: 201 });
});
