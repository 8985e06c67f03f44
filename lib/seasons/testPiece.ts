/**
 * The season's test piece: an uploaded STL (ASCII or binary) is measured on the server — bounding
 * box, triangle count, enclosed volume — with lib/stl, then kept through lib/storage. A file that is
 * not a valid STL is refused with the reader's own sentence.
 */
import path from 'node:path';
import { StoredFile, TestPiece } from '@/models';
import { submittedEntryCount } from '@/lib/seasons/rulebook';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError, conflict } from '@/lib/errors';
import { StlError, type StlSummary } from '@/lib/stl';
import { measureStlFile } from '@/lib/seasons/stlMeasure';
import { putFile, removeFile } from '@/lib/storage';
import type { UploadResult, UploadSpec } from '@/lib/uploads';
import { TEST_PIECE_MAX_BYTES } from '@/lib/seasons/schemas';
import { managedSeason, type Actor } from '@/lib/seasons/context';
import { testPieceColumns } from '@/lib/seasons/testPieceColumns';

export const TEST_PIECE_UPLOAD: UploadSpec = {
  files: { file: { maxBytes: TEST_PIECE_MAX_BYTES, maxCount: 1, required: true, label: 'the test piece STL' } },
  fields: ['name'],
  maxTotalBytes: TEST_PIECE_MAX_BYTES,
};

export function testPieceJson(tp: TestPiece | null) {
  if (!tp) return null;
  return {
    name: tp.name,
    format: tp.format,
    triangleCount: tp.triangleCount,
    sizeXMm: tp.sizeXMm,
    sizeYMm: tp.sizeYMm,
    sizeZMm: tp.sizeZMm,
    volumeMm3: tp.volumeMm3,
  };
}

export async function saveTestPiece(actor: Actor, seasonId: number, upload: UploadResult) {
  try {
    const file = upload.files.file[0];
    const season = await managedSeason(seasonId, undefined, actor);
    const entries = await submittedEntryCount(seasonId);
    if (entries > 0 || season.state === 'final' || season.state === 'archived')
      throw conflict(`The test piece cannot change: ${entries > 0 ? `${entries} entries were already printed against it` : `the season is ${season.state}`}.`);
    let stl: StlSummary;
    try {
      stl = await measureStlFile(file.tmpPath);
    } catch (err) {
      if (err instanceof StlError) throw new HttpError(422, `${file.originalName} is not a usable STL: ${err.message}`, { file: err.message }, `stl_${err.code}`);
      throw err;
    }
    if (!(stl.volumeMm3 > 0)) throw new HttpError(422, 'The mesh encloses no volume; export the test piece as a closed solid.', { file: 'The mesh encloses no volume.' });
    const name = (upload.fields.name ?? '').trim().slice(0, 120) || path.basename(file.originalName).replace(/\.stl$/i, '').slice(0, 120) || 'Test piece';
    // A fresh key per upload: a failed save removes only its own file, never an earlier one.
    const key = `test-pieces/season-${season.id}-${file.sha256.slice(0, 16)}-${Date.now().toString(36)}.stl`;
    await putFile(file.tmpPath, key);
    try {
      return await getSequelize().transaction(async (transaction) => {
        const stored = await StoredFile.create(
          { ownerId: actor.user.id, entryId: null, kind: 'test_piece', originalName: file.originalName, mime: 'model/stl', sizeBytes: file.sizeBytes, sha256: file.sha256, storageKey: key, meta: { format: stl.format, warnings: stl.warnings } },
          { transaction },
        );
        const values = { seasonId: season.id, storedFileId: stored.id, name, ...testPieceColumns(stl) };
        const existing = await TestPiece.findOne({ where: { seasonId: season.id }, transaction });
        const tp = existing ? await existing.update(values, { transaction }) : await TestPiece.create(values, { transaction });
        await audit('season.test_piece_uploaded', { type: 'season', id: season.id }, {
          actorId: actor.user.id, ip: actor.ip, transaction,
          details: { file: file.originalName, sha256: file.sha256, format: stl.format, triangles: stl.triangleCount, sizeMm: stl.sizeMm, volumeMm3: stl.volumeMm3 },
        });
        return { testPiece: testPieceJson(tp)!, warnings: stl.warnings };
      });
    } catch (err) {
      await removeFile(key).catch(() => {});
      throw err;
    }
  } finally {
    await upload.cleanup();
  }
}
