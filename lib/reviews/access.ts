/**
 * Who may see and decide what on the review desk. A judge sees entries of the seasons they serve
 * and nothing else (others answer 404, as if they did not exist); a judge never decides on their
 * own entry, nor one of a class in which they compete that season (lib/reviews/conflicts).
 */
import { Entry, SeasonJudge } from '@/models';
import { forbidden, notFound, HttpError } from '@/lib/errors';
import { refuseConflictedJudge } from './conflicts';

export async function servedSeasonIds(judgeId: number): Promise<number[]> {
  const rows = await SeasonJudge.findAll({ where: { userId: judgeId }, attributes: ['seasonId'] });
  return rows.map((r) => r.seasonId);
}

export async function servesSeason(judgeId: number, seasonId: number): Promise<boolean> {
  return (await SeasonJudge.count({ where: { userId: judgeId, seasonId } })) > 0;
}

/** The entry, when this judge serves its season and the entry has left the entrant's drafts; else 404. */
export async function entryForJudge(judgeId: number, entryId: number): Promise<Entry> {
  const entry = Number.isSafeInteger(entryId) && entryId > 0 ? await Entry.findByPk(entryId) : null;
  if (!entry || entry.state === 'draft' || !(await servesSeason(judgeId, entry.seasonId))) {
    throw notFound('No entry with this number is on your review desk.');
  }
  return entry;
}

/** Why a judge may not open their own entry; the API and the review page say the same. */
export const OWN_ENTRY_SENTENCE = 'You cannot judge your own entry: another judge of the season reviews it.';

/**
 * Why this judge may not open this entry (their own, or a class they compete in), or null when they
 * may, or when it is not on their desk at all. For the review page's 403 screen.
 */
export async function reviewDenial(judgeId: number, entryId: number): Promise<string | null> {
  try {
    await reviewableEntry(judgeId, entryId);
    return null;
  } catch (err) {
    if (err instanceof HttpError && err.status === 403) return err.message;
    return null;
  }
}

/** An entry this judge may review: in a season they serve, and not their own (a judge never reviews their own entry). */
export async function reviewableEntry(judgeId: number, entryId: number): Promise<Entry> {
  const entry = await entryForJudge(judgeId, entryId);
  if (entry.entrantId === judgeId) throw forbidden(OWN_ENTRY_SENTENCE);
  // A rival's evidence is not for a judge who competes in the same class.
  await refuseConflictedJudge(judgeId, entry);
  return entry;
}
