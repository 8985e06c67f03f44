import { route, parseInput } from '@/lib/http';
import { managedSeason, requireOrganizer, revokeInvitation } from '@/lib/seasons';
import { InvitationParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string; invitationId: string }> };

export const DELETE = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id, invitationId } = parseInput(InvitationParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  await revokeInvitation(actor, id, invitationId);
  return Response.json({ message: 'Invitation withdrawn.' });
});
