import { route, readBody, parseInput, TEXT_FORM_BODY_LIMIT_BYTES } from '@/lib/http';
import { managedSeason, requireOrganizer, seasonJson, updateSeason } from '@/lib/seasons';
import { SeasonInputSchema, SeasonParams } from '@/lib/seasons/schemas';
import { organizerSeasonView } from '@/lib/seasons/view';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  return Response.json(await organizerSeasonView(actor, id));
});

export const PUT = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const input = await readBody(req, SeasonInputSchema);
  const season = await updateSeason(actor, id, input);
  return Response.json({ season: seasonJson(season), message: 'Season settings saved.' });
}, { maxBodyBytes: TEXT_FORM_BODY_LIMIT_BYTES });
