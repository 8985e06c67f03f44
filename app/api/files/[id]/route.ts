import { Readable } from 'node:stream';
import { route, parseInput } from '@/lib/http';
import { currentUser } from '@/lib/auth/guard';
import { notFound } from '@/lib/errors';
import { StoredFile } from '@/models';
import { canReadFile } from '@/lib/entries/files';
import { exists, openRead } from '@/lib/storage';
import { IdParams } from '@/lib/entries/schema';

const INLINE = new Set(['image/jpeg', 'image/png', 'image/webp']);

/** A stored file, streamed, for whoever may read it; everyone else gets 404 (existence stays private). */
export const GET = route<{ params: Promise<{ id: string }> }>(async (_req, ctx) => {
  const { id } = parseInput(IdParams, await ctx.params);
  const [user, file] = await Promise.all([currentUser(), StoredFile.findByPk(id)]);
  if (!file || !(await canReadFile(user, file)) || !(await exists(file.storageKey))) throw notFound('No such file.');
  const name = file.originalName.replace(/[^\w.() -]+/g, '_');
  const body = Readable.toWeb(openRead(file.storageKey)) as ReadableStream;
  return new Response(body, {
    headers: {
      'content-type': file.mime,
      'content-length': String(file.sizeBytes),
      'content-disposition': `${INLINE.has(file.mime) ? 'inline' : 'attachment'}; filename="${name}"`,
      'x-content-type-options': 'nosniff',
      // Content-addressed by id and never rewritten; private because access depends on who asks.
      'cache-control': 'private, max-age=3600',
    },
  });
});
