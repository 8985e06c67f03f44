import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { entryFormOptions } from '@/lib/entries';

export const GET = route(async () => {
  const user = await requireRole('entrant');
  return Response.json(await entryFormOptions(user.id));
});
