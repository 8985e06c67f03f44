import { z } from 'zod';
import { idSchema } from '@/lib/ids';
import { route, readBody, parseInput, clientIp } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { RolesUpdateSchema } from '@/lib/auth/schemas';
import { setRoles } from '@/lib/accounts';

const Params = z.object({ id: idSchema('The user id must be a positive whole number.') });

export const PUT = route<{ params: Promise<{ id: string }> }>(async (req, ctx) => {
  const actor = await requireRole('admin');
  const { id } = parseInput(Params, await ctx.params);
  const { roles } = await readBody(req, RolesUpdateSchema);
  const user = await setRoles(actor, id, roles, clientIp(req.headers));
  return Response.json({ id: user.id, roles: user.roles, message: `Roles of ${user.name} saved.` });
});
