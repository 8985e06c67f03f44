import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { createEntryFromUpload } from '@/lib/entries';
import { entrantOverview } from '@/lib/queries';

export const GET = route(async () => {
  const user = await requireRole('entrant');
  return Response.json({ entries: (await entrantOverview(user.id)).entries });
});

/** Multipart: entry details + gcode (+ photos, project) → a draft whose inspection starts at once. */
export const POST = route(async (req) => {
  const user = await requireRole('entrant');
  return Response.json(await createEntryFromUpload(user, req), { status: 201 });
});
