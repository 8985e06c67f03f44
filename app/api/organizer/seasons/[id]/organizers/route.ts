import { route, readBody, parseInput } from '@/lib/http';
import { addCoOrganizer, managedSeason, requireOrganizer, seasonOrganizers } from '@/lib/seasons';
import { JudgeByEmailSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  return Response.json({ organizers: await seasonOrganizers(await managedSeason(id, undefined, actor)) });
});

/** Adds a co-organizer (an account with the organizer role) by e-mail. */
export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const { email } = await readBody(req, JudgeByEmailSchema);
  const organizer = await addCoOrganizer(actor, id, email);
  return Response.json({ organizer, message: `${organizer.name} now co-organizes this season.` }, { status: 201 });
});
