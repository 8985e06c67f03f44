import { route } from '@/lib/http';
import { parseId } from '@/lib/standings/views';
import { fileResponse, readableFile } from '@/lib/storage/access';

/**
 * GET /api/v1/entries/{id}/photos/{file} — a photo of a verified entry, streamed from storage. The
 * public API reads no session: only what the file access rule grants to everyone.
 */
export const GET = route(async (_req, ctx: { params: Promise<{ id: string; file: string }> }) => {
  const p = await ctx.params;
  const { file, grant } = await readableFile(null, parseId(p.file, 'photo'), { entryId: parseId(p.id, 'entry'), kinds: ['photo'] });
  return fileResponse(file, grant);
});
