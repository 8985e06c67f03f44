/**
 * Private evidence on the review desk: photos at full size, the G-code, the evidence link and the
 * toolpath preview. Every access goes through the judge's access check and full-size views are
 * written to the audit log.
 */
import { Inspection } from '@/models';
import { notFound } from '@/lib/errors';
import { fileResponse, readableFile, type FileReader } from '@/lib/storage/access';
import { auditEvidenceView } from './evidenceAudit';
import { parseStoredPreview } from '@/lib/inspection/preview';
import { reviewableEntry } from './access';
import { currentGcode } from '@/lib/entries/inspection';

const JUDGE_FILE_KINDS = ['photo', 'thumbnail', 'gcode', 'project'] as const;

export { auditEvidenceView, type EvidenceView } from './evidenceAudit';

/**
 * A stored file of the entry as a streamed response, under the one file access rule
 * (lib/storage/access: judges of the season, not drafts, not their own or conflicted entries);
 * full-size photos, G-code and project files are audited there.
 */
export async function judgeFile(judge: FileReader, entryId: number, fileId: number, opts: { thumb?: boolean; ip?: string | null } = {}): Promise<Response> {
  const entry = await reviewableEntry(judge.id, entryId);
  const { file, grant } = await readableFile(judge, fileId, { entryId: entry.id, kinds: JUDGE_FILE_KINDS, thumb: opts.thumb, ip: opts.ip });
  return fileResponse(file, grant);
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
