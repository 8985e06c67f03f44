/**
 * Private evidence on the review desk: photos at full size, the G-code, the evidence link and the
 * toolpath preview. Every access goes through the judge's access check and full-size views are
 * written to the audit log.
 */
import fs from 'node:fs';
import { HttpError, notFound } from '@/lib/errors';
import { exists, localPath, putBuffer } from '@/lib/storage';
import { fileResponse, readableFile, type FileReader } from '@/lib/storage/access';
import { auditEvidenceView } from './evidenceAudit';
import { buildPreviewFromFile, PREVIEW_VERSION, type ToolpathPreview } from '@/lib/inspection/preview';
import { InspectionError } from '@/lib/inspection/reader';
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

/** Computed previews are kept in storage next to the uploads, keyed by the G-code's hash and the format version. */
const previewKey = (sha256: string) => `previews/${sha256.slice(0, 64)}-v${PREVIEW_VERSION}.json`;

/** The toolpath preview JSON of the entry's latest G-code (computed once, then served from storage). */
export async function entryPreviewJson(judgeId: number, entryId: number, ip?: string | null): Promise<string> {
  const entry = await reviewableEntry(judgeId, entryId);
  const gcode = await currentGcode(entry.id);
  if (!gcode) throw notFound('This entry has no G-code to preview.');
  // The preview draws the entrant's G-code: a view of private evidence like the download.
  await auditEvidenceView(judgeId, entry.id, 'toolpath_preview', { fileId: gcode.id, ip });
  const key = previewKey(/^[0-9a-f]{64}$/.test(gcode.sha256) ? gcode.sha256 : `file-${gcode.id}`);
  if (await exists(key)) return fs.promises.readFile(localPath(key), 'utf8');
  let preview: ToolpathPreview;
  try {
    const diameter = typeof gcode.meta?.filamentDiameterMm === 'number' ? gcode.meta.filamentDiameterMm : undefined;
    preview = await buildPreviewFromFile(localPath(gcode.storageKey), { filamentDiameterMm: diameter });
  } catch (err) {
    if (err instanceof InspectionError) throw new HttpError(422, `The G-code cannot be previewed: ${err.message}`);
    throw err;
  }
  const json = JSON.stringify(preview);
  await putBuffer(key, Buffer.from(json));
  return json;
}
