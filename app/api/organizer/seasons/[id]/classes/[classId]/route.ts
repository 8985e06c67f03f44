import { route, readBody, parseInput } from '@/lib/http';
import { classJson, deleteClass, managedSeason, requireOrganizer, updateClass } from '@/lib/seasons';
import { ClassInputSchema, ClassParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string; classId: string }> };

export const PUT = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id, classId } = parseInput(ClassParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  const input = await readBody(req, ClassInputSchema);
  const c = await updateClass(actor, id, classId, input);
  return Response.json({ class: classJson(c), message: `Class ${c.name} saved.` });
});

export const DELETE = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id, classId } = parseInput(ClassParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  await deleteClass(actor, id, classId);
  return Response.json({ message: 'Class removed.' });
});
