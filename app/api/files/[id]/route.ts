import { route, parseInput, clientIp } from '@/lib/http';
import { currentUser } from '@/lib/auth/guard';
import { IdParams } from '@/lib/entries/schema';
import { fileResponse, readableFile } from '@/lib/storage/access';

/** A stored file, streamed, under the one file access rule (lib/storage/access); everyone else gets 404. */
export const GET = route<{ params: Promise<{ id: string }> }>(async (req, ctx) => {
  const { id } = parseInput(IdParams, await ctx.params);
  const user = await currentUser();
  const { file, grant } = await readableFile(user, id, { ip: clientIp(req.headers) });
  return fileResponse(file, grant);
});
