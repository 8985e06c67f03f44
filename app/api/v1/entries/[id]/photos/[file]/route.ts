import { Readable } from 'node:stream';
import { route } from '@/lib/http';
import { openRead } from '@/lib/storage';
import { parseId, publicPhoto } from '@/lib/standings/views';
import { notFound } from '@/lib/errors';

/** GET /api/v1/entries/{id}/photos/{file} — a photo of a verified entry, streamed from storage. */
export const GET = route(async (_req, ctx: { params: Promise<{ id: string; file: string }> }) => {
  const p = await ctx.params;
  const photo = await publicPhoto(parseId(p.id, 'entry'), parseId(p.file, 'photo'));
  const stream = openRead(photo.key);
  await new Promise<void>((ok, fail) => stream.once('open', () => ok()).once('error', () => fail(notFound('The photo file is missing from storage.'))));
  return new Response(Readable.toWeb(stream) as ReadableStream, {
    headers: {
      'Content-Type': /^image\/(jpeg|png|webp)$/.test(photo.mime) ? photo.mime : 'application/octet-stream',
      'Cache-Control': 'public, max-age=86400',
      'X-Content-Type-Options': 'nosniff',
    },
  });
});
