import { route, parseInput } from '@/lib/http';
import { receiveUpload } from '@/lib/uploads';
import { managedSeason, requireOrganizer, saveTestPiece, TEST_PIECE_UPLOAD } from '@/lib/seasons';
import { SeasonParams } from '@/lib/seasons/schemas';

type Ctx = { params: Promise<{ id: string }> };

export const POST = route<Ctx>(async (req, ctx) => {
  const actor = await requireOrganizer(req);
  const { id } = parseInput(SeasonParams, await ctx.params);
  await managedSeason(id, undefined, actor);
  // Refuses an oversized upload by its declared length before reading any of it (413).
  const upload = await receiveUpload(req, TEST_PIECE_UPLOAD);
  const result = await saveTestPiece(actor, id, upload);
  return Response.json({ ...result, message: `Test piece ${result.testPiece.name} saved.` }, { status: 201 });
});
