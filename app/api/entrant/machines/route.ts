import { route, readBody } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { createMachine, listMachines, MachineSchema } from '@/lib/machines';

export const GET = route(async () => {
  const user = await requireRole('entrant');
  return Response.json({ machines: await listMachines(user.id) });
});

export const POST = route(async (req) => {
  const user = await requireRole('entrant');
  const input = await readBody(req, MachineSchema);
  return Response.json(await createMachine(user.id, input), { status: 201 });
});
