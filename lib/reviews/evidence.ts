/**
 * Private evidence on the review desk: photos at full size, the G-code, the evidence link and the
 * toolpath preview. Every access goes through the judge's access check and full-size views are
 * written to the audit log.
 */
import { Readable } from 'node:stream';
import { Inspection, StoredFile } from '@/models';
import { audit } from '@/lib/audit';
import { notFound } from '@/lib/errors';
import { exists, openRead } from '@/lib/storage';
import { parseStoredPreview } from '@/lib/inspection/preview';
import { reviewableEntry } from './access';
import { currentGcode } from '@/lib/entries/inspection';

const JUDGE_FILE_KINDS = ['photo', 'thumbnail', 'gcode'];

/** What a judge looked at; other file routes that serve private evidence to judges call this too. */
export type EvidenceView = 'review' | 'photo' | 'gcode' | 'project' | 'evidence_link' | 'toolpath_preview';

export async function auditEvidenceView(actorId: number, entryId: number, view: EvidenceView, extra: { fileId?: number; url?: string; ip?: string | null } = {}) {
  const { ip, ...details } = extra;
  await audit('evidence.viewed', { type: 'entry', id: entryId }, { actorId, ip: ip ?? null, details: { view, ...details } });
}

/** A stored file of the entry as a streamed response; full-size photos and G-code are audited. */
export async function judgeFile(judgeId: number, entryId: number, fileId: number, opts: { thumb?: boolean; ip?: string | null } = {}): Promise<Response> {
  const entry = await reviewableEntry(judgeId, entryId);
  const file = Number.isSafeInteger(fileId) ? await StoredFile.findOne({ where: { id: fileId, entryId: entry.id } }) : null;
  if (!file || !JUDGE_FILE_KINDS.includes(file.kind)) throw notFound('This entry has no such file.');
  if (!(await exists(file.storageKey))) throw notFound('The file is missing from storage.');
  if (file.kind !== 'thumbnail' && !opts.thumb) {
    await auditEvidenceView(judgeId, entry.id, file.kind as EvidenceView, { fileId: file.id, ip: opts.ip });
  }
  const body = Readable.toWeb(openRead(file.storageKey)) as ReadableStream;
  const download = file.kind === 'gcode';
  return new Response(body, {
    headers: {
      'content-type': download ? 'application/octet-stream' : file.mime,
      'content-length': String(file.sizeBytes),
      'cache-control': 'private, no-store',
      'x-content-type-options': 'nosniff',
      'content-disposition': `${download ? 'attachment' : 'inline'}; filename="${file.originalName.replace(/[^\w.-]+/g, '_')}"`,
    },
  });
}

/** Audits the click on the entrant's evidence link and returns where to send the judge. */
export async function evidenceLink(judgeId: number, entryId: number, ip?: string | null): Promise<string> {
  const entry = await reviewableEntry(judgeId, entryId);
  if (!/^https?:\/\//i.test(entry.evidenceUrl)) throw notFound('This entry has no evidence link.');
  await auditEvidenceView(judgeId, entry.id, 'evidence_link', { url: entry.evidenceUrl, ip });
  return entry.evidenceUrl;
}

/**
 * The toolpath preview JSON of the entry's current G-code. The inspection pass builds it and the
 * job stores it on the inspection row, so serving it reads a column and never parses G-code.
 */
export async function entryPreviewJson(judgeId: number, entryId: number, ip?: string | null): Promise<string> {
  const entry = await reviewableEntry(judgeId, entryId);
  const gcode = await currentGcode(entry.id);
  if (!gcode) throw notFound('This entry has no G-code to preview.');
  // The preview draws the entrant's G-code: a view of private evidence like the download.
  await auditEvidenceView(judgeId, entry.id, 'toolpath_preview', { fileId: gcode.id, ip });
  const row = await Inspection.findOne({
    where: { entryId: entry.id, storedFileId: gcode.id, status: 'done' },
    order: [['id', 'DESC']],
    attributes: ['id', 'preview'],
  });
  const preview = row ? parseStoredPreview(row.preview) : null;
  if (!preview) {
    throw notFound(
      row
        ? 'This G-code was inspected before toolpath previews were kept with the inspection: use "Inspect again" to build one.'
        : 'The toolpath preview is built by the inspection of this G-code, which has not finished yet: try again in a moment.',
    );
  }
  return JSON.stringify(preview);
}
