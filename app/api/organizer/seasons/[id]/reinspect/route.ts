import { route, readBody, parseInput } from '@/lib/http';
import { managedSeason, requestReinspection, requireOrganizer } from '@/lib/seasons';
import { ReinspectSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  await readBody(req, ReinspectSchema);
  const result = await requestReinspection(actor, id);
  return Response.json({ ...result, message: `${result.queued} entries queued for inspection.` });
});
