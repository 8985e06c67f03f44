/** Creating and editing a season's settings (name, dates, evidence, limits). */
import { Op, UniqueConstraintError } from 'sequelize';
import { Season } from '@/models';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { conflict } from '@/lib/errors';
import type { SeasonInput } from '@/lib/seasons/schemas';
import type { SeasonState } from '@/lib/domain';
import { utcToZonedLocal, zonedLocalToUtc } from '@/lib/seasons/time';
import { managedSeason, type Actor } from '@/lib/seasons/context';

const slugTaken = (slug: string) => conflict('That address name is taken.', { slug: `Another season already uses "${slug}"; choose a different address name.` });

/** The parsed input is the columns (zod strips unknown keys), but for the dates, stored as UTC instants. */
function columns(input: SeasonInput) {
  return { ...input, opensAt: zonedLocalToUtc(input.opensAt, input.timeZone), closesAt: zonedLocalToUtc(input.closesAt, input.timeZone) };
}

export async function createSeason(actor: Actor, input: SeasonInput): Promise<Season> {
  try {
    return await getSequelize().transaction(async (transaction) => {
      if (await Season.findOne({ where: { slug: input.slug }, transaction })) throw slugTaken(input.slug);
      const season = await Season.create({ ...columns(input), state: 'draft', rulesFrozenAt: null, createdById: actor.user.id }, { transaction });
      await audit('season.created', { type: 'season', id: season.id }, { actorId: actor.user.id, ip: actor.ip, details: { slug: season.slug, name: season.name }, transaction });
      return season;
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw slugTaken(input.slug);
    throw err;
  }
}

/** Settings that entrants rely on cannot move under them once the season is final. */
export async function updateSeason(actor: Actor, seasonId: number, input: SeasonInput): Promise<Season> {
  try {
    return await getSequelize().transaction(async (transaction) => {
      const season = await managedSeason(seasonId, transaction, actor);
      if (season.state === 'final' || season.state === 'archived')
        throw conflict(`The season is ${season.state}: its settings are frozen with its standings.`);
      if (input.slug !== season.slug && (await Season.findOne({ where: { slug: input.slug, id: { [Op.ne]: season.id } }, transaction })))
        throw slugTaken(input.slug);
      const before = season.get({ plain: true });
      const next = columns(input);
      const changed = Object.keys(next).filter((k) => {
        const a = (before as Record<string, unknown>)[k];
        const b = (next as Record<string, unknown>)[k];
        return JSON.stringify(a instanceof Date ? a.toISOString() : a) !== JSON.stringify(b instanceof Date ? b.toISOString() : b);
      });
      await season.update(next, { transaction });
      await audit('season.updated', { type: 'season', id: season.id }, { actorId: actor.user.id, ip: actor.ip, details: { changed }, transaction });
      return season;
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw slugTaken(input.slug);
    throw err;
  }
}

/** The editor's starting values for a season (dates as wall-clock times of its zone). */
export function seasonFormValues(season: Season): SeasonInput {
  return {
    name: season.name,
    slug: season.slug,
    hostName: season.hostName,
    description: season.description,
    opensAt: utcToZonedLocal(season.opensAt, season.timeZone),
    closesAt: utcToZonedLocal(season.closesAt, season.timeZone),
    timeZone: season.timeZone,
    timingConvention: season.timingConvention,
    photosRequired: season.photosRequired,
    photoKinds: season.photoKinds ?? [],
    videoRequired: season.videoRequired,
    entryLimit: season.entryLimit,
    verificationsRequired: season.verificationsRequired,
  };
}

export function seasonJson(season: Season) {
  return {
    ...seasonFormValues(season),
    id: season.id,
    state: season.state as SeasonState,
    opensAtUtc: season.opensAt.toISOString(),
    closesAtUtc: season.closesAt.toISOString(),
    rulesFrozenAt: season.rulesFrozenAt?.toISOString() ?? null,
    standingsFrozenAt: season.standingsFrozenAt?.toISOString() ?? null,
  };
}
