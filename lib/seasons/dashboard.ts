/** The organizer's read model: per season, entries by state, the oldest entry waiting, judges' load. */
import { QueryTypes } from 'sequelize';
import { Entry, Season, SeasonJudge, User } from '@/models';
import { getSequelize } from '@/lib/db';
import { ENTRY_STATES, type EntryState } from '@/lib/domain';
import { organizedSeasonIds } from '@/lib/seasons/context';
import { competingClassKeys, isConflicted } from '@/lib/reviews/conflicts';

export interface JudgeLoad {
  userId: number;
  name: string;
  /** submitted entries of the season this judge may decide (never their own, nor of a class they compete in) */
  waiting: number;
  /** reviews this judge has written on entries of the season */
  reviews: number;
}

export interface SeasonDashboard {
  id: number;
  slug: string;
  name: string;
  state: string;
  opensAt: string;
  closesAt: string;
  timeZone: string;
  entries: Record<EntryState, number>;
  oldestWaiting: { entryId: number; entrant: string; submittedAt: string; waitingH: number } | null;
  judges: JudgeLoad[];
}

/** `organizerId`: only the seasons this organizer runs (created or co-organizes). */
export async function organizerDashboard(opts: { seasonId?: number; organizerId?: number; now?: Date } = {}): Promise<SeasonDashboard[]> {
  const now = opts.now ?? new Date();
  const scope = opts.organizerId !== undefined ? await organizedSeasonIds(opts.organizerId) : null;
  const ids0 = opts.seasonId ? [opts.seasonId].filter((id) => !scope || scope.includes(id)) : scope;
  const where = ids0 ? { id: ids0 } : {};
  const seasons = await Season.findAll({ where, order: [['opensAt', 'DESC'], ['id', 'DESC']] });
  const ids = seasons.map((s) => s.id);
  if (!ids.length) return [];
  const sequelize = getSequelize();
  const [counts, waiting, judgeRows, reviewRows] = await Promise.all([
    sequelize.query<{ seasonId: number; state: EntryState; n: number }>(
      'SELECT season_id AS "seasonId", state, COUNT(*) AS n FROM entries WHERE season_id IN (:ids) GROUP BY season_id, state',
      { replacements: { ids }, type: QueryTypes.SELECT },
    ),
    Entry.findAll({
      where: { seasonId: ids, state: 'submitted' },
      attributes: ['id', 'seasonId', 'classId', 'entrantId', 'submittedAt'],
      order: [['submittedAt', 'ASC'], ['id', 'ASC']],
      include: [{ model: User, as: 'entrant', attributes: ['id', 'name'] }],
    }),
    SeasonJudge.findAll({ where: { seasonId: ids }, order: [['createdAt', 'ASC']] }),
    sequelize.query<{ seasonId: number; judgeId: number; n: number }>(
      'SELECT e.season_id AS "seasonId", r.judge_id AS "judgeId", COUNT(*) AS n FROM reviews r JOIN entries e ON e.id = r.entry_id WHERE e.season_id IN (:ids) GROUP BY e.season_id, r.judge_id',
      { replacements: { ids }, type: QueryTypes.SELECT },
    ),
  ]);
  const judgeIds = [...new Set(judgeRows.map((j) => j.userId))];
  const judgeUsers = await User.findAll({ where: { id: judgeIds }, attributes: ['id', 'name'] });
  // Classes each judge competes in: those entries wait for other judges (conflicts of interest).
  const competing = new Map(await Promise.all(judgeIds.map(async (id) => [id, await competingClassKeys(id, ids)] as const)));
  const nameOf = new Map(judgeUsers.map((u) => [u.id, u.name]));

  return seasons.map((s) => {
    const entries = Object.fromEntries(ENTRY_STATES.map((st) => [st, 0])) as Record<EntryState, number>;
    for (const c of counts) if (c.seasonId === s.id) entries[c.state] = Number(c.n);
    const mine = waiting.filter((e) => e.seasonId === s.id);
    const first = mine[0];
    const firstEntrant = first ? (first as unknown as { entrant: User | null }).entrant : null;
    return {
      id: s.id,
      slug: s.slug,
      name: s.name,
      state: s.state,
      opensAt: s.opensAt.toISOString(),
      closesAt: s.closesAt.toISOString(),
      timeZone: s.timeZone,
      entries,
      oldestWaiting: first?.submittedAt
        ? { entryId: first.id, entrant: firstEntrant?.name ?? '—', submittedAt: first.submittedAt.toISOString(), waitingH: Math.max(0, (now.getTime() - first.submittedAt.getTime()) / 3600_000) }
        : null,
      judges: judgeRows
        .filter((j) => j.seasonId === s.id)
        .map((j) => ({
          userId: j.userId,
          name: nameOf.get(j.userId) ?? '—',
          waiting: mine.filter((e) => e.entrantId !== j.userId && !isConflicted(competing.get(j.userId)!, e)).length,
          reviews: Number(reviewRows.find((r) => r.seasonId === s.id && r.judgeId === j.userId)?.n ?? 0),
        })),
    };
  });
}
