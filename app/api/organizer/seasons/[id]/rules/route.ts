import { route, readBody, parseInput, TEXT_FORM_BODY_LIMIT_BYTES } from '@/lib/http';
import { managedSeason, requireOrganizer, rulebookRules, rulesFreeze, saveRulebook } from '@/lib/seasons';
import { RulebookInputSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  const season = await managedSeason(id, undefined, actor);
  return Response.json({ rules: await rulebookRules(id), freeze: await rulesFreeze(season) });
});

/** Saves the whole rulebook at once (add, edit, reorder, remove), all or nothing. */
export const PUT = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const input = await readBody(req, RulebookInputSchema);
  const result = await saveRulebook(actor, id, input);
  const re = result.reinspection ? ` ${result.reinspection.queued} entries are queued for inspection under the new rules.` : '';
  return Response.json({ ...result, message: `Rulebook saved: ${result.saved} rules.${re}` });
}, { maxBodyBytes: TEXT_FORM_BODY_LIMIT_BYTES });
