import { route, readBody, TEXT_FORM_BODY_LIMIT_BYTES } from '@/lib/http';
import { createSeason, organizerDashboard, requireOrganizer, seasonJson } from '@/lib/seasons';
import { SeasonInputSchema } from '@/lib/seasons/schemas';

export const GET = route(async (req) => {
  const actor = await requireOrganizer(req);
  return Response.json({ seasons: await organizerDashboard({ organizerId: actor.user.id }) });
});

export const POST = route(async (req) => {
  const actor = await requireOrganizer(req);
  const input = await readBody(req, SeasonInputSchema);
  const season = await createSeason(actor, input);
  return Response.json({ season: seasonJson(season), message: `${season.name} is created as a draft.` }, { status: 201 });
}, { maxBodyBytes: TEXT_FORM_BODY_LIMIT_BYTES });
