/**
 * The one access rule for stored files, used by every route that streams one (`/api/files/:id`,
 * the review desk's `/api/judging/entries/:id/files/:fileId`, the public API's entry photos):
 *
 * - the owner (the entrant who uploaded it, the organizer who uploaded a test piece) always;
 * - a judge of the entry's season once the entry has left the drafts, unless it is their own entry
 *   or one of a class in which they compete that season; every judge view of a full-size file is
 *   written to the evidence-view audit, as the review desk does;
 * - everyone for what the public pages already show: cleaned photos (and their thumbnails) of
 *   verified entries of published seasons, and the test piece of a published season; a draft
 *   season's test piece is for its organizers. G-code and project files are never public (the
 *   public entry page shows figures from the inspection, not the file);
 * - nobody else: 404 with one sentence, whatever the reason, so sequential ids say nothing about
 *   which files exist.
 */
import 'server-only';
import { Readable } from 'node:stream';
import { Entry, Season, SeasonJudge, StoredFile, TestPiece } from '@/models';
import { notFound } from '@/lib/errors';
import type { StoredFileKind } from '@/lib/domain';
import { exists, isStorageNotFound, openRead } from '@/lib/storage';
import { organizesSeason } from '@/lib/seasons/context';
import { conflictSentence } from '@/lib/reviews/conflicts';
import { auditEvidenceView, type EvidenceView } from '@/lib/reviews/evidenceAudit';

export interface FileReader {
  id: number;
  roles: readonly string[];
}

export type FileGrant = 'owner' | 'judge' | 'public' | 'organizer';

const PUBLIC_ENTRY_KINDS: readonly StoredFileKind[] = ['photo', 'thumbnail'];
const JUDGE_KINDS: readonly StoredFileKind[] = ['photo', 'thumbnail', 'gcode', 'project'];
export const NO_SUCH_FILE = 'No such file.';

/** An entry still in the entrant's hands: a draft, or withdrawn before it was ever submitted. */
const isPrivateDraft = (e: Pick<Entry, 'state' | 'submittedAt'>) => e.state === 'draft' || (e.state === 'withdrawn' && !e.submittedAt);

/** Why this reader may read this file, or null. */
export async function fileGrant(reader: FileReader | null, file: StoredFile): Promise<FileGrant | null> {
  if (reader && file.ownerId === reader.id) return 'owner';
  if (file.kind === 'test_piece') {
    const piece = await TestPiece.findOne({ where: { storedFileId: file.id }, attributes: ['seasonId'] });
    const season = piece ? await Season.findByPk(piece.seasonId, { attributes: ['id', 'state', 'createdById'] }) : null;
    if (!season) return null;
    if (season.state !== 'draft') return 'public';
    return reader && (await organizesSeason(reader.id, season)) ? 'organizer' : null;
  }
  if (!file.entryId) return null;
  const entry = await Entry.findByPk(file.entryId, { attributes: ['id', 'entrantId', 'seasonId', 'classId', 'state', 'submittedAt'] });
  if (!entry) return null;
  if (reader && entry.entrantId === reader.id) return 'owner';
  if (PUBLIC_ENTRY_KINDS.includes(file.kind) && entry.state === 'verified' && !file.meta?.replacedAt) {
    const season = await Season.findByPk(entry.seasonId, { attributes: ['id', 'state'] });
    if (season && season.state !== 'draft') return 'public';
  }
  if (!reader || !reader.roles.includes('judge') || !JUDGE_KINDS.includes(file.kind) || isPrivateDraft(entry)) return null;
  if (!(await SeasonJudge.count({ where: { seasonId: entry.seasonId, userId: reader.id } }))) return null;
  if (await conflictSentence(reader.id, entry)) return null;
  return 'judge';
}

/**
 * The file, when this reader may read it (and, with `entryId` / `kinds`, when it belongs to that
 * entry and is of one of those kinds); else 404. Judge views of full-size files are audited here.
 */
export async function readableFile(
  reader: FileReader | null,
  fileId: number,
  opts: { entryId?: number; kinds?: readonly StoredFileKind[]; thumb?: boolean; ip?: string | null } = {},
): Promise<{ file: StoredFile; grant: FileGrant }> {
  const file = Number.isSafeInteger(fileId) && fileId > 0 ? await StoredFile.findByPk(fileId) : null;
  if (!file || (opts.entryId !== undefined && file.entryId !== opts.entryId) || (opts.kinds && !opts.kinds.includes(file.kind))) throw notFound(NO_SUCH_FILE);
  const grant = await fileGrant(reader, file);
  if (!grant || !(await exists(file.storageKey))) throw notFound(NO_SUCH_FILE);
  if (grant === 'judge' && file.kind !== 'thumbnail' && !opts.thumb) {
    await auditEvidenceView(reader!.id, file.entryId!, file.kind as EvidenceView, { fileId: file.id, ip: opts.ip });
  }
  return { file, grant };
}

/** Types a browser may show inline; everything else downloads, and nothing is sniffed. */
const INLINE = new Set(['image/jpeg', 'image/png', 'image/webp']);

/**
 * The streamed response for a granted file, read from storage through the app (whichever driver:
 * no public bucket, no presigned link around this rule). Public files may be cached briefly by
 * anyone (a re-inspection can take an entry out of public view); everything else is private and
 * not stored. A file gone between the check and the read is the same 404.
 */
export async function fileResponse(file: StoredFile, grant: FileGrant): Promise<Response> {
  const name = file.originalName.replace(/[^\w.() -]+/g, '_');
  const inline = INLINE.has(file.mime);
  const body = await openRead(file.storageKey).catch((err) => {
    throw isStorageNotFound(err) ? notFound(NO_SUCH_FILE) : err;
  });
  return new Response(Readable.toWeb(body) as ReadableStream, {
    headers: {
      'content-type': inline ? file.mime : 'application/octet-stream',
      'content-length': String(file.sizeBytes),
      'content-disposition': `${inline ? 'inline' : 'attachment'}; filename="${name}"`,
      'x-content-type-options': 'nosniff',
      'cache-control': grant === 'public' ? 'public, max-age=600' : 'private, no-store',
    },
  });
}
