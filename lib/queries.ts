/** Read models for the entrant's overview and the public season lists. */
import 'server-only';
import { Op } from 'sequelize';
import { ContestClass, Entry, Machine, Season } from '@/models';

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
    return { id: s.id, slug: s.slug, name: s.name, hostName: s.hostName, state: s.state, opensAt: s.opensAt.toISOString(), closesAt: s.closesAt.toISOString(), timeZone: s.timeZone, description: s.description, classes: classes.map((c) => ({ name: c.name, slug: c.slug })) };
  });
}
