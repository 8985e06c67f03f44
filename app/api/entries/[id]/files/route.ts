import { route, parseInput } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { replaceEntryFiles } from '@/lib/entries';
import { IdParams } from '@/lib/entries/schema';

/** Multipart: a new G-code (re-inspects), new photos (replace the set) and/or a new project file. */
export const POST = route<{ params: Promise<{ id: string }> }>(async (req, ctx) => {
  const user = await requireRole('entrant');
  const { id } = parseInput(IdParams, await ctx.params);
  return Response.json(await replaceEntryFiles(user, id, req));
});
