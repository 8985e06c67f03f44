import { route, parseInput, clientIp } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { judgeFile } from '@/lib/reviews/evidence';
import { EntryFileParams } from '@/lib/reviews/params';

/** GET /api/judging/entries/:id/files/:fileId[?thumb=1] — a photo, thumbnail, G-code or project file of the entry. */
export const GET = route<{ params: Promise<{ id: string; fileId: string }> }>(async (req, ctx) => {
  const judge = await requireRole('judge');
  const { id, fileId } = parseInput(EntryFileParams, await ctx.params);
  const thumb = new URL(req.url).searchParams.get('thumb') === '1';
  return judgeFile(judge, id, fileId, { thumb, ip: clientIp(req.headers) });
});
