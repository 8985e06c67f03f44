import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { organizerSeasons } from '@/lib/queries';

export const GET = route(async () => {
  await requireRole('organizer');
  return Response.json({ seasons: await organizerSeasons() });
});
