/**
 * The judge's queue: submitted entries of the seasons they serve, oldest first, never their own nor
 * those of a class the judge competes in (conflict of interest).
 */
import { z } from 'zod';
import { idSchema } from '@/lib/ids';
import { Op } from 'sequelize';
import { ContestClass, Entry, EntryReinspection, Inspection, Review, Season, User } from '@/models';
import { competingClassKeys, isConflicted } from './conflicts';
import { changeSentence } from './reinspection';
import { notFound } from '@/lib/errors';
import { servedSeasonIds } from './access';
import { flagKinds, QUEUE_FLAG_FILTER_LIST, type QueueFlagFilter } from './flags';
import { requiredVerifications, roundOpenedAt, roundVerifiers } from './round';

export const QueueFilterSchema = z.object({
  season: idSchema('The season filter must be a season number.').optional(),
  class: idSchema('The class filter must be a class number.').optional(),
  flag: z.enum(QUEUE_FLAG_FILTER_LIST, { message: `Choose one of: ${QUEUE_FLAG_FILTER_LIST.join(', ')}.` }).optional(),
});
export type QueueFilter = z.infer<typeof QueueFilterSchema>;

/**
 * Per entry: the newest inspection row (which may be a re-inspection still queued or running) and
 * the newest finished one, whose findings the judges work from. Rows are never overwritten.
 */
export async function latestInspections(entryIds: number[]): Promise<Map<number, { newest: Inspection; done: Inspection | null }>> {
  const out = new Map<number, { newest: Inspection; done: Inspection | null }>();
  if (!entryIds.length) return out;
  const rows = await Inspection.findAll({
    where: { entryId: entryIds },
    attributes: ['id', 'entryId', 'status', 'ruleResults', 'flags', 'blockingFailures', 'advisoryFlags', 'peakFlowMm3s', 'estimatedTimeS', 'createdAt'],
    order: [['id', 'DESC']],
  });
  for (const r of rows) {
    const cur = out.get(r.entryId);
    if (!cur) out.set(r.entryId, { newest: r, done: r.status === 'done' ? r : null });
    else if (!cur.done && r.status === 'done') cur.done = r;
  }
  return out;
}

export async function reviewQueue(judgeId: number, filter: QueueFilter = {}) {
  let seasonIds = await servedSeasonIds(judgeId);
  if (filter.season !== undefined) {
    if (!seasonIds.includes(filter.season)) throw notFound('No season with this number is on your review desk.');
    seasonIds = [filter.season];
  }
  const empty = { seasons: [], classes: [], flagCounts: Object.fromEntries(QUEUE_FLAG_FILTER_LIST.map((k) => [k, 0])), total: 0, entries: [], conflicts: { count: 0, classes: [] as string[] } };
  if (!seasonIds.length) return empty;
  const [seasons, entries] = await Promise.all([
    Season.findAll({ where: { id: seasonIds }, order: [['name', 'ASC']] }),
    Entry.findAll({
      where: { seasonId: seasonIds, state: 'submitted', entrantId: { [Op.ne]: judgeId } },
      order: [['submittedAt', 'ASC'], ['id', 'ASC']],
      include: [
        { model: User, as: 'entrant', attributes: ['id', 'name'] },
        { model: ContestClass, as: 'class', attributes: ['id', 'name', 'displayOrder'] },
      ],
      limit: 1000,
    }),
  ]);
  // Entries of classes the judge competes in are decided by other judges: not on this desk at all.
  const competing = await competingClassKeys(judgeId, seasonIds);
  const conflicted = entries.filter((e) => isConflicted(competing, e));
  const entriesShown = entries.filter((e) => !isConflicted(competing, e));
  const ids = entriesShown.map((e) => e.id);
  const reopenedIds = entriesShown.filter((e) => e.reopenedAt).map((e) => e.id);
  const [insp, reviews, reopenings] = await Promise.all([
    latestInspections(ids),
    ids.length ? Review.findAll({ where: { entryId: ids }, attributes: ['entryId', 'judgeId', 'decision', 'createdAt'] }) : Promise.resolve([] as Review[]),
    reopenedIds.length ? EntryReinspection.findAll({ where: { entryId: reopenedIds, fromState: 'verified', toState: 'submitted' }, order: [['id', 'DESC']] }) : Promise.resolve([] as EntryReinspection[]),
  ]);
  const reopenedBy = new Map<number, EntryReinspection>();
  for (const r of reopenings) if (!reopenedBy.has(r.entryId)) reopenedBy.set(r.entryId, r);
  const seasonById = new Map(seasons.map((s) => [s.id, s]));
  const rows = entriesShown.map((e) => {
    const x = e as unknown as { entrant: User; class: ContestClass };
    const found = insp.get(e.id);
    const i = found?.done ?? null;
    const season = seasonById.get(e.seasonId)!;
    const verifiers = roundVerifiers(reviews.filter((r) => r.entryId === e.id), roundOpenedAt(e));
    return {
      id: e.id,
      seasonId: e.seasonId,
      season: season.name,
      classId: x.class.id,
      class: x.class.name,
      entrant: x.entrant.name,
      claimedTimeMs: e.claimedTimeMs,
      submittedAt: e.submittedAt?.toISOString() ?? null,
      inspection: found ? { status: found.newest.status, estimatedTimeS: i?.estimatedTimeS ?? null, peakFlowMm3s: i?.peakFlowMm3s ?? null } : null,
      flags: flagKinds(i),
      verifications: { count: verifiers.length, required: requiredVerifications(season.verificationsRequired), byMe: verifiers.includes(judgeId) },
      // Back from the standings after a re-inspection failed a blocking rule: what changed, rule by rule.
      reopened: reopenedBy.has(e.id)
        ? { at: reopenedBy.get(e.id)!.createdAt.toISOString(), changes: reopenedBy.get(e.id)!.changes.map((c) => ({ ...c, text: changeSentence(c) })) }
        : null,
    };
  });
  const byFlag = (r: (typeof rows)[number]) => !filter.flag || r.flags.includes(filter.flag);
  const byClass = (r: (typeof rows)[number]) => !filter.class || r.classId === filter.class;
  // Counts per class respect the flag filter, counts per flag respect the class filter, so each
  // number says how many rows choosing that option would show.
  const classCounts = new Map<number, { id: number; name: string; season: string; count: number }>();
  for (const e of entriesShown) {
    const c = (e as unknown as { class: ContestClass }).class;
    if (!classCounts.has(c.id)) classCounts.set(c.id, { id: c.id, name: c.name, season: seasonById.get(e.seasonId)!.name, count: 0 });
  }
  for (const r of rows) if (byFlag(r)) classCounts.get(r.classId)!.count++;
  const flagCounts = Object.fromEntries(QUEUE_FLAG_FILTER_LIST.map((k) => [k, 0])) as Record<QueueFlagFilter, number>;
  for (const r of rows) if (byClass(r)) for (const k of r.flags) flagCounts[k]++;
  const shown = rows.filter((r) => byFlag(r) && byClass(r));
  return {
    seasons: seasons.map((s) => ({ id: s.id, slug: s.slug, name: s.name, state: s.state, verificationsRequired: requiredVerifications(s.verificationsRequired) })),
    classes: [...classCounts.values()],
    flagCounts,
    total: rows.length,
    entries: shown,
    /** Entries left off because the judge competes in their class (decided by other judges). */
    conflicts: { count: conflicted.length, classes: [...new Set(conflicted.map((e) => (e as unknown as { class: ContestClass }).class.name))] },
  };
}
export type ReviewQueue = Awaited<ReturnType<typeof reviewQueue>>;
