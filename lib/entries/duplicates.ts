/**
 * Finding the same G-code in another entrant's entry. Raw file hashes miss a gzipped copy and a
 * copy with edited comments, so each stored G-code gets two fingerprints (lib/inspection/fingerprint):
 * the decompressed content and the moves without comments or whitespace. Fingerprints are computed
 * once per stored file, outside any write transaction (a stream read from storage), and kept in
 * `gcode_fingerprints`.
 */
import { Op, QueryTypes } from 'sequelize';
import { Entry, GcodeFingerprint, StoredFile } from '@/models';
import { getSequelize } from '@/lib/db';
import { openRead } from '@/lib/storage';
import { fingerprintGcodeStream } from '@/lib/inspection/fingerprint';

/** G-code files of older uploads fingerprinted per lookup (a one-off backfill spread over inspections). */
const BACKFILL_PER_LOOKUP = 20;

export type DuplicateMatch = 'same_file' | 'same_content' | 'same_moves';

export interface Duplicate {
  entryId: number;
  match: DuplicateMatch;
}

const MATCH_WORDS: Record<DuplicateMatch, string> = {
  same_file: 'the same file',
  same_content: 'the same G-code once decompressed',
  same_moves: 'the same moves; only comments or spacing differ',
};

/** The engine's `duplicateOfEntry` claim: the other entry's number, its link and how it matched. */
export const duplicateClaim = (d: Duplicate) => `#${d.entryId} (/entries/${d.entryId}: ${MATCH_WORDS[d.match]})`;

/** The stored fingerprint of a G-code file, computed and stored on first use; null when the file cannot be read. */
export async function fingerprintOf(file: StoredFile): Promise<GcodeFingerprint | null> {
  const known = await GcodeFingerprint.findByPk(file.id);
  if (known) return known;
  try {
    const fp = await fingerprintGcodeStream(await openRead(file.storageKey));
    const [row] = await GcodeFingerprint.upsert({ storedFileId: file.id, contentSha256: fp.contentSha256, movesSha256: fp.movesSha256, lines: fp.lines });
    return row;
  } catch {
    // Unreadable or not G-code text: the inspection itself reports that to the entrant.
    return null;
  }
}

/**
 * Fingerprints up to `limit` stored G-code files that have none yet (newest first), other than
 * `excludeFileId`; returns how many it did. `scripts/fingerprint-gcode.ts` runs it to the end.
 */
export async function backfillFingerprints(limit = BACKFILL_PER_LOOKUP, excludeFileId = 0): Promise<number> {
  const rows = await getSequelize().query<{ id: number }>(
    `SELECT f.id FROM stored_files f LEFT JOIN gcode_fingerprints g ON g.stored_file_id = f.id
     WHERE f.kind = 'gcode' AND f.entry_id IS NOT NULL AND g.stored_file_id IS NULL AND f.id <> ? ORDER BY f.id DESC LIMIT ?`,
    { replacements: [excludeFileId, limit], type: QueryTypes.SELECT },
  );
  let done = 0;
  for (const r of rows) {
    const f = await StoredFile.findByPk(r.id);
    // An unreadable file is stored with no fingerprint and tried again next time; count only successes.
    if (f && (await fingerprintOf(f))) done++;
  }
  return done;
}

/**
 * The entry holding the first upload of the same G-code (by raw hash, decompressed content or
 * moves; non-withdrawn entries, uploads not replaced), when that first upload came from another
 * entrant; null when there is none or the first one is this entrant's own (an entrant may reuse
 * their own print in another season). Only earlier uploads count: whoever uploads a copy later is
 * the one flagged, so a copier cannot knock out the original entry on its re-inspection.
 */
export async function findDuplicate(entry: Pick<Entry, 'id' | 'entrantId'>, gcodeSha256: string): Promise<Duplicate | null> {
  const file = await StoredFile.findOne({ where: { entryId: entry.id, kind: 'gcode', sha256: gcodeSha256 }, order: [['id', 'DESC']] });
  if (!file) {
    // No stored upload to compare (should not happen for an inspection): the raw hash of earlier entries.
    const byRaw = await Entry.findOne({ where: { gcodeSha256, entrantId: { [Op.ne]: entry.entrantId }, state: { [Op.ne]: 'withdrawn' }, id: { [Op.lt]: entry.id } }, order: [['id', 'ASC']], attributes: ['id'] });
    return byRaw ? { entryId: byRaw.id, match: 'same_file' } : null;
  }
  const fp = await fingerprintOf(file);
  await backfillFingerprints(BACKFILL_PER_LOOKUP, file.id);
  const rows = await getSequelize().query<{ entry_id: number; entrant_id: number; file_id: number; sha256: string; content_sha256: string | null; meta: unknown }>(
    `SELECT e.id AS entry_id, e.entrant_id, f.id AS file_id, f.sha256, g.content_sha256, f.meta FROM stored_files f
     JOIN entries e ON e.id = f.entry_id LEFT JOIN gcode_fingerprints g ON g.stored_file_id = f.id
     WHERE f.kind = 'gcode' AND f.id < :file AND e.state <> 'withdrawn' AND e.id <> :entry
       AND (f.sha256 = :sha ${fp ? 'OR g.content_sha256 = :content OR g.moves_sha256 = :moves' : ''})
     ORDER BY f.id ASC`,
    {
      replacements: { file: file.id, entry: entry.id, sha: gcodeSha256, content: fp?.contentSha256 ?? '', moves: fp?.movesSha256 ?? '' },
      type: QueryTypes.SELECT,
    },
  );
  // A replaced upload is no longer the entry's G-code.
  const replaced = (meta: unknown) => !!(typeof meta === 'string' ? JSON.parse(meta || '{}') : (meta ?? {}))?.replacedAt;
  const first = rows.find((r) => !replaced(r.meta));
  if (!first || first.entrant_id === entry.entrantId) return null;
  const match: DuplicateMatch = first.sha256 === gcodeSha256 ? 'same_file' : fp && first.content_sha256 === fp.contentSha256 ? 'same_content' : 'same_moves';
  return { entryId: first.entry_id, match };
}
