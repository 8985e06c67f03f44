import { route, readBody, parseInput } from '@/lib/http';
import { managedSeason, requireOrganizer, seasonJson, transitionSeason } from '@/lib/seasons';
import { SeasonParams, TransitionSchema } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const input = await readBody(req, TransitionSchema);
  const { season, notified } = await transitionSeason(actor, id, input);
  const mails = input.notify ? ` ${notified} subscriber${notified === 1 ? '' : 's'} notified.` : '';
  return Response.json({ season: seasonJson(season), notified, message: `${season.name} is now ${season.state}.${mails}` });
});
