import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { entrantOverview } from '@/lib/queries';

export const GET = route(async () => {
  const user = await requireRole('entrant');
  return Response.json(await entrantOverview(user.id));
});
