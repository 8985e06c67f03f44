import { route, readBody, parseInput } from '@/lib/http';
import { classJson, createClass, managedSeason, reorderClasses, requireOrganizer } from '@/lib/seasons';
import { ClassInputSchema, ClassOrderSchema, SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const input = await readBody(req, ClassInputSchema);
  const c = await createClass(actor, id, input);
  return Response.json({ class: classJson(c), message: `Class ${c.name} added.` }, { status: 201 });
});

/** New display order: every class id of the season, once. */
export const PUT = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const { classIds } = await readBody(req, ClassOrderSchema);
  const classes = await reorderClasses(actor, id, classIds);
  return Response.json({ classes: classes.map(classJson), message: 'Class order saved.' });
});
