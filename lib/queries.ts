/** Read models for the role dashboards (organizer, judge, entrant). */
import { Op, fn, col } from 'sequelize';
import { ContestClass, Entry, Machine, Season, SeasonJudge, User } from '@/models';
import { ENTRY_STATES, type EntryState } from '@/lib/domain';

export async function organizerSeasons() {
  const seasons = await Season.findAll({ order: [['opensAt', 'DESC']] });
  const counts = (await Entry.findAll({
    attributes: ['seasonId', 'state', [fn('COUNT', col('id')), 'n']],
    group: ['seasonId', 'state'],
    raw: true,
  })) as unknown as { seasonId: number; state: EntryState; n: number }[];
  return seasons.map((s) => {
    const byState = Object.fromEntries(ENTRY_STATES.map((st) => [st, 0])) as Record<EntryState, number>;
    for (const c of counts) if (c.seasonId === s.id) byState[c.state] = Number(c.n);
    return { id: s.id, slug: s.slug, name: s.name, state: s.state, opensAt: s.opensAt.toISOString(), closesAt: s.closesAt.toISOString(), entries: byState };
  });
}

/** Submitted entries of the seasons this judge serves, oldest first, never the judge's own. */
export async function judgeQueue(judgeId: number) {
  const served = await SeasonJudge.findAll({ where: { userId: judgeId } });
  const seasonIds = served.map((s) => s.seasonId);
  if (!seasonIds.length) return { seasons: [], entries: [] };
  const [seasons, entries] = await Promise.all([
    Season.findAll({ where: { id: seasonIds }, order: [['name', 'ASC']] }),
    Entry.findAll({
      where: { seasonId: seasonIds, state: 'submitted', entrantId: { [Op.ne]: judgeId } },
      order: [['submittedAt', 'ASC'], ['id', 'ASC']],
      include: [
        { model: User, as: 'entrant', attributes: ['id', 'name'] },
        { model: ContestClass, as: 'class', attributes: ['id', 'name'] },
        { model: Season, attributes: ['id', 'name', 'slug'] },
      ],
      limit: 500,
    }),
  ]);
  return {
    seasons: seasons.map((s) => ({ id: s.id, slug: s.slug, name: s.name, state: s.state })),
    entries: entries.map((e) => {
      const x = e as unknown as { entrant: User; class: ContestClass; Season: Season };
      return {
        id: e.id,
        season: x.Season.name,
        class: x.class.name,
        entrant: x.entrant.name,
        claimedTimeMs: e.claimedTimeMs,
        submittedAt: e.submittedAt?.toISOString() ?? null,
      };
    }),
  };
}

export async function entrantOverview(userId: number) {
  const [entries, machines] = await Promise.all([
    Entry.findAll({
      where: { entrantId: userId },
      order: [['updatedAt', 'DESC']],
      include: [
        { model: Season, attributes: ['name', 'slug'] },
        { model: ContestClass, as: 'class', attributes: ['name'] },
        { model: Machine, attributes: ['name'] },
      ],
    }),
    Machine.findAll({ where: { ownerId: userId }, order: [['name', 'ASC']] }),
  ]);
  return {
    entries: entries.map((e) => {
      const x = e as unknown as { Season: Season; class: ContestClass; Machine: Machine };
      return { id: e.id, season: x.Season.name, class: x.class.name, machine: x.Machine.name, state: e.state, claimedTimeMs: e.claimedTimeMs, submittedAt: e.submittedAt?.toISOString() ?? null };
    }),
    machines: machines.map((m) => ({ id: m.id, name: m.name, motionSystem: m.motionSystem, nozzleMm: m.nozzleMm, retired: !!m.retiredAt })),
  };
}

export async function publicSeasons() {
  const seasons = await Season.findAll({
    where: { state: { [Op.ne]: 'draft' } },
    order: [['opensAt', 'DESC']],
    include: [{ model: ContestClass, as: 'classes', attributes: ['id', 'name', 'slug', 'displayOrder'] }],
  });
  return seasons.map((s) => {
    const classes = ((s as unknown as { classes: ContestClass[] }).classes ?? []).sort((a, b) => a.displayOrder - b.displayOrder);
    return { id: s.id, slug: s.slug, name: s.name, hostName: s.hostName, state: s.state, opensAt: s.opensAt.toISOString(), closesAt: s.closesAt.toISOString(), description: s.description, classes: classes.map((c) => ({ name: c.name, slug: c.slug })) };
  });
}
