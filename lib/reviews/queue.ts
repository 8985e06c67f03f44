/**
 * The judge's queue: submitted entries of the seasons they serve (the "waiting" view, oldest first)
 * or entries any judge decided (the "decided" view), never their own nor those of a class the judge
 * competes in (conflict of interest). Search by entrant or machine name runs in the database; sort,
 * class and flag filters and paging are applied to at most 1000 rows.
 */
import { z } from 'zod';
import { idSchema } from '@/lib/ids';
import { Op, col, fn, literal, where as sqlWhere } from 'sequelize';
import { ContestClass, Entry, EntryReinspection, Inspection, Machine, Review, Season, User } from '@/models';
import { competingClassKeys, isConflicted } from './conflicts';
import { changeSentence } from './reinspection';
import { notFound } from '@/lib/errors';
import { servedSeasonIds } from './access';
import { flagKinds, QUEUE_FLAG_FILTER_LIST, type QueueFlagFilter } from './flags';
import { requiredVerifications, roundOpenedAt, roundVerifiers } from './round';

/** The queue's two views: entries waiting for a decision, and entries already decided (by anyone). */
export const QUEUE_VIEWS = { waiting: 'Waiting', decided: 'Decided' } as const;
export type QueueView = keyof typeof QUEUE_VIEWS;
const QUEUE_VIEW_LIST = Object.keys(QUEUE_VIEWS) as [QueueView, ...QueueView[]];

/** Orders of the queue. Ties fall back to the older submission, then the entry number. */
export const QUEUE_SORTS = {
  oldest: 'Oldest submission first',
  newest: 'Newest submission first',
  claimed: 'Shortest claimed time first',
  entrant: 'Entrant, A–Z',
  decided: 'Latest decision first',
} as const;
export type QueueSort = keyof typeof QUEUE_SORTS;
const QUEUE_SORT_LIST = Object.keys(QUEUE_SORTS) as [QueueSort, ...QueueSort[]];

/** Rows per page of the queue. */
export const QUEUE_PAGE_SIZE = 50;
/** Longest search text, characters. */
export const QUEUE_SEARCH_MAX = 80;

export const QueueFilterSchema = z.object({
  view: z.enum(QUEUE_VIEW_LIST, { message: `Choose one of: ${QUEUE_VIEW_LIST.join(', ')}.` }).optional(),
  season: idSchema('The season filter must be a season number.').optional(),
  class: idSchema('The class filter must be a class number.').optional(),
  flag: z.enum(QUEUE_FLAG_FILTER_LIST, { message: `Choose one of: ${QUEUE_FLAG_FILTER_LIST.join(', ')}.` }).optional(),
  sort: z.enum(QUEUE_SORT_LIST, { message: `Choose one of: ${QUEUE_SORT_LIST.join(', ')}.` }).optional(),
  q: z
    .string({ message: 'Search for an entrant or machine name.' })
    .trim()
    .max(QUEUE_SEARCH_MAX, `Search for at most ${QUEUE_SEARCH_MAX} characters.`)
    .transform((v) => v || undefined)
    .optional(),
  page: idSchema('The page must be a page number (1, 2, …).').optional(),
});
export type QueueFilter = z.infer<typeof QueueFilterSchema>;

/** The filter as URL parameters (defaults left out), for links that keep the judge's place. */
export function queueSearchParams(f: QueueFilter, change: Partial<QueueFilter> = {}): string {
  const q = new URLSearchParams();
  const merged = { ...f, ...change };
  for (const k of ['view', 'season', 'class', 'flag', 'sort', 'q', 'page'] as const) {
    const v = merged[k];
    if (v !== undefined && v !== '') q.set(k, String(v));
  }
  return q.toString();
}

/** LIKE pattern for a name search: the text anywhere, case-insensitive; % and _ typed by the judge match any character. */
const likePattern = (text: string) => `%${text.toLowerCase().replace(/[%_\\]/g, '_')}%`;

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

type Row = Awaited<ReturnType<typeof queueRows>>['rows'][number];

const byText = (a: string, b: string) => a.localeCompare(b, 'en', { sensitivity: 'base' });
const time = (iso: string | null) => (iso ? Date.parse(iso) : 0);
const SORTERS: Record<QueueSort, (a: Row, b: Row) => number> = {
  oldest: (a, b) => time(a.submittedAt) - time(b.submittedAt) || a.id - b.id,
  newest: (a, b) => time(b.submittedAt) - time(a.submittedAt) || b.id - a.id,
  claimed: (a, b) => a.claimedTimeMs - b.claimedTimeMs || SORTERS.oldest(a, b),
  entrant: (a, b) => byText(a.entrant, b.entrant) || SORTERS.oldest(a, b),
  decided: (a, b) => time(b.decision?.at ?? null) - time(a.decision?.at ?? null) || SORTERS.oldest(a, b),
};

/** The sort a view uses when the judge has not chosen one. */
export const defaultSort = (view: QueueView): QueueSort => (view === 'decided' ? 'decided' : 'oldest');

/** Every row of the view for this judge (before the class/flag filters and paging), with the lists the filters offer. */
async function queueRows(judgeId: number, filter: QueueFilter) {
  const view: QueueView = filter.view ?? 'waiting';
  let seasonIds = await servedSeasonIds(judgeId);
  if (filter.season !== undefined) {
    if (!seasonIds.includes(filter.season)) throw notFound('No season with this number is on your review desk.');
    seasonIds = [filter.season];
  }
  if (!seasonIds.length) return { view, seasons: [] as Season[], rows: [], conflicted: [] as Entry[] };
  const search = filter.q
    ? {
        [Op.or]: [
          sqlWhere(fn('lower', col('entrant.name')), { [Op.like]: likePattern(filter.q) }),
          sqlWhere(fn('lower', col('Machine.name')), { [Op.like]: likePattern(filter.q) }),
        ],
      }
    : {};
  const [seasons, entries] = await Promise.all([
    Season.findAll({ where: { id: seasonIds }, order: [['name', 'ASC']] }),
    Entry.findAll({
      where: {
        seasonId: seasonIds,
        entrantId: { [Op.ne]: judgeId },
        // Decided: any entry past the drafts with at least one decision on record, whatever its state now.
        ...(view === 'waiting' ? { state: 'submitted' } : { state: { [Op.ne]: 'draft' }, id: { [Op.in]: literal('(SELECT entry_id FROM reviews)') } }),
        ...search,
      },
      order: view === 'waiting' ? [['submittedAt', 'ASC'], ['id', 'ASC']] : [['updatedAt', 'DESC'], ['id', 'DESC']],
      include: [
        { model: User, as: 'entrant', attributes: ['id', 'name'] },
        { model: ContestClass, as: 'class', attributes: ['id', 'name', 'displayOrder'] },
        { model: Machine, attributes: ['id', 'name'] },
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
    ids.length
      ? Review.findAll({ where: { entryId: ids }, attributes: ['id', 'entryId', 'judgeId', 'decision', 'createdAt'], include: [{ model: User, as: 'judge', attributes: ['id', 'name'] }], order: [['id', 'ASC']] })
      : Promise.resolve([] as Review[]),
    reopenedIds.length ? EntryReinspection.findAll({ where: { entryId: reopenedIds, fromState: 'verified', toState: 'submitted' }, order: [['id', 'DESC']] }) : Promise.resolve([] as EntryReinspection[]),
  ]);
  const reopenedBy = new Map<number, EntryReinspection>();
  for (const r of reopenings) if (!reopenedBy.has(r.entryId)) reopenedBy.set(r.entryId, r);
  const reviewsOf = new Map<number, Review[]>();
  for (const r of reviews) reviewsOf.set(r.entryId, [...(reviewsOf.get(r.entryId) ?? []), r]);
  const seasonById = new Map(seasons.map((s) => [s.id, s]));
  const rows = entriesShown.map((e) => {
    const x = e as unknown as { entrant: User; class: ContestClass; Machine: Machine | null };
    const found = insp.get(e.id);
    const i = found?.done ?? null;
    const season = seasonById.get(e.seasonId)!;
    const mine = reviewsOf.get(e.id) ?? [];
    const verifiers = roundVerifiers(mine, roundOpenedAt(e));
    const last = mine[mine.length - 1] ?? null;
    return {
      id: e.id,
      seasonId: e.seasonId,
      season: season.name,
      classId: x.class.id,
      class: x.class.name,
      entrant: x.entrant.name,
      machine: x.Machine?.name ?? null,
      state: e.state,
      claimedTimeMs: e.claimedTimeMs,
      submittedAt: e.submittedAt?.toISOString() ?? null,
      inspection: found ? { status: found.newest.status, estimatedTimeS: i?.estimatedTimeS ?? null, peakFlowMm3s: i?.peakFlowMm3s ?? null } : null,
      flags: flagKinds(i),
      verifications: { count: verifiers.length, required: requiredVerifications(season.verificationsRequired), byMe: verifiers.includes(judgeId) },
      /** The latest decision on record, and who took it. */
      decision: last
        ? { decision: last.decision, judge: (last as unknown as { judge: User | null }).judge?.name ?? 'a judge', byMe: last.judgeId === judgeId, at: last.createdAt.toISOString() }
        : null,
      decidedByMe: mine.some((r) => r.judgeId === judgeId),
      // Back from the standings after a re-inspection failed a blocking rule: what changed, rule by rule.
      reopened: reopenedBy.has(e.id)
        ? { at: reopenedBy.get(e.id)!.createdAt.toISOString(), changes: reopenedBy.get(e.id)!.changes.map((c) => ({ ...c, text: changeSentence(c) })) }
        : null,
    };
  });
  rows.sort(SORTERS[filter.sort ?? defaultSort(view)]);
  return { view, seasons, rows, conflicted };
}

const matches = (filter: QueueFilter) => ({
  byFlag: (r: Row) => !filter.flag || r.flags.includes(filter.flag),
  byClass: (r: Row) => !filter.class || r.classId === filter.class,
});

export async function reviewQueue(judgeId: number, filter: QueueFilter = {}) {
  const { view, seasons, rows, conflicted } = await queueRows(judgeId, filter);
  const { byFlag, byClass } = matches(filter);
  // Counts per class respect the flag filter, counts per flag respect the class filter, so each
  // number says how many rows choosing that option would show.
  const classCounts = new Map<number, { id: number; name: string; season: string; count: number }>();
  for (const r of rows) if (!classCounts.has(r.classId)) classCounts.set(r.classId, { id: r.classId, name: r.class, season: r.season, count: 0 });
  for (const r of rows) if (byFlag(r)) classCounts.get(r.classId)!.count++;
  const flagCounts = Object.fromEntries(QUEUE_FLAG_FILTER_LIST.map((k) => [k, 0])) as Record<QueueFlagFilter, number>;
  for (const r of rows) if (byClass(r)) for (const k of r.flags) flagCounts[k]++;
  const shown = rows.filter((r) => byFlag(r) && byClass(r));
  const pageCount = Math.max(1, Math.ceil(shown.length / QUEUE_PAGE_SIZE));
  const page = Math.min(filter.page ?? 1, pageCount);
  return {
    view,
    sort: filter.sort ?? defaultSort(view),
    seasons: seasons.map((s) => ({ id: s.id, slug: s.slug, name: s.name, state: s.state, verificationsRequired: requiredVerifications(s.verificationsRequired) })),
    classes: [...classCounts.values()],
    flagCounts,
    total: rows.length,
    /** Rows matching every filter, over all pages. */
    matched: shown.length,
    page,
    pageCount,
    pageSize: QUEUE_PAGE_SIZE,
    entries: shown.slice((page - 1) * QUEUE_PAGE_SIZE, page * QUEUE_PAGE_SIZE),
    /** Entries left off because the judge competes in their class (decided by other judges). */
    conflicts: { count: conflicted.length, classes: [...new Set(conflicted.map((e) => (e as unknown as { class: ContestClass }).class.name))] },
  };
}

/**
 * Where an entry sits in the judge's queue with the same view, filters and sort: the entries before
 * and after it, for the review screen's previous/next (the page reads them before a decision, so
 * after deciding the judge goes on to the entry that followed).
 */
export async function queueNeighbours(judgeId: number, entryId: number, filter: QueueFilter = {}) {
  const { rows } = await queueRows(judgeId, { ...filter, page: undefined });
  const { byFlag, byClass } = matches(filter);
  const shown = rows.filter((r) => byFlag(r) && byClass(r));
  const at = shown.findIndex((r) => r.id === entryId);
  if (at >= 0) return { position: at + 1, count: shown.length, previous: shown[at - 1]?.id ?? null, next: shown[at + 1]?.id ?? null };
  // Not in this list (decided meanwhile, or opened from another view): "next" starts the list.
  return { position: null, count: shown.length, previous: null, next: shown[0]?.id ?? null };
}
export type ReviewQueue = Awaited<ReturnType<typeof reviewQueue>>;

/**
 * The judge's own latest decision on an entry and the entry's state now, read back from the
 * database for the note shown on the next entry after deciding (null when this judge has none).
 */
export async function ownLatestDecision(judgeId: number, entryId: number) {
  const review = await Review.findOne({ where: { entryId, judgeId }, order: [['id', 'DESC']], attributes: ['id', 'decision', 'createdAt'] });
  if (!review) return null;
  const entry = await Entry.findByPk(entryId, { attributes: ['id', 'state'] });
  return entry ? { entryId, decision: review.decision, at: review.createdAt.toISOString(), entryState: entry.state } : null;
}
