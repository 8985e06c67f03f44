import { route, parseInput, readBody } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { listExtrusionTests, recordExtrusionTest } from '@/lib/machines';
import { IdParams } from '@/lib/entries/schema';
import { ExtrusionTestSchema } from '@/lib/extrusion';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json({ tests: await listExtrusionTests(user.id, id) });
});

export const POST = route<Ctx>(async (req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(await recordExtrusionTest(user.id, id, await readBody(req, ExtrusionTestSchema)), { status: 201 });
});
