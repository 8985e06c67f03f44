import { z } from 'zod';
import { route, readBody, parseInput } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { machineJson, MachineSchema, ownMachine, retireMachine, updateMachine } from '@/lib/machines';
import { IdParams } from '@/lib/entries/schema';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(machineJson(await ownMachine(user.id, id)));
});

export const PUT = route<Ctx>(async (req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(await updateMachine(user.id, id, await readBody(req, MachineSchema)));
});

const RetireSchema = z.object({ retired: z.boolean({ error: () => 'Say whether the machine is retired (true or false).' }) });

/** Retire or bring back a machine. */
export const PATCH = route<Ctx>(async (req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  const { retired } = await readBody(req, RetireSchema);
  return Response.json(await retireMachine(user.id, id, retired));
});
