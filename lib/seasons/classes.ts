/** A season's classes: eligibility and display order. */
import { Op, UniqueConstraintError, type Transaction } from 'sequelize';
import { ContestClass, Entry, Rule } from '@/models';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { badRequest, conflict, notFound } from '@/lib/errors';
import type { ClassInput } from '@/lib/seasons/schemas';
import { managedSeason, type Actor } from '@/lib/seasons/context';

const slugTaken = (slug: string) => conflict('That class address name is taken in this season.', { slug: `Another class of this season already uses "${slug}".` });

function refuseWhenFinal(state: string) {
  if (state === 'final' || state === 'archived') throw conflict(`The season is ${state}: its classes are frozen with its standings.`);
}

export function classJson(c: ContestClass) {
  return {
    id: c.id,
    slug: c.slug,
    name: c.name,
    description: c.description,
    nozzleDiametersMm: c.nozzleDiametersMm,
    nozzleMinMm: c.nozzleMinMm,
    materialFamilies: c.materialFamilies,
    motionSystems: c.motionSystems,
    buildVolumeMinMm: c.buildVolumeMinMm,
    buildVolumeMaxMm: c.buildVolumeMaxMm,
    modification: c.modification,
    displayOrder: c.displayOrder,
  };
}
export type ClassJson = ReturnType<typeof classJson>;

export async function seasonClasses(seasonId: number, transaction?: Transaction) {
  return ContestClass.findAll({ where: { seasonId }, order: [['displayOrder', 'ASC'], ['id', 'ASC']], transaction });
}

async function withSlugCheck<T>(slug: string, fn: () => Promise<T>): Promise<T> {
  try {
    return await fn();
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw slugTaken(slug);
    throw err;
  }
}

export async function createClass(actor: Actor, seasonId: number, input: ClassInput) {
  return withSlugCheck(input.slug, () =>
    getSequelize().transaction(async (transaction) => {
      const season = await managedSeason(seasonId, transaction, actor);
      refuseWhenFinal(season.state);
      if (await ContestClass.findOne({ where: { seasonId, slug: input.slug }, transaction })) throw slugTaken(input.slug);
      const last = (await ContestClass.max('displayOrder', { where: { seasonId }, transaction })) as number | null;
      const c = await ContestClass.create({ ...input, seasonId, displayOrder: (last ?? -1) + 1 }, { transaction });
      await audit('season.class_created', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { classId: c.id, slug: c.slug }, transaction });
      return c;
    }),
  );
}

export async function updateClass(actor: Actor, seasonId: number, classId: number, input: ClassInput) {
  return withSlugCheck(input.slug, () =>
    getSequelize().transaction(async (transaction) => {
      const season = await managedSeason(seasonId, transaction, actor);
      refuseWhenFinal(season.state);
      const c = await ContestClass.findOne({ where: { id: classId, seasonId }, transaction });
      if (!c) throw notFound('No class with that id in this season.');
      if (await ContestClass.findOne({ where: { seasonId, slug: input.slug, id: { [Op.ne]: c.id } }, transaction })) throw slugTaken(input.slug);
      await c.update(input, { transaction });
      await audit('season.class_updated', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { classId: c.id, slug: c.slug }, transaction });
      return c;
    }),
  );
}

export async function deleteClass(actor: Actor, seasonId: number, classId: number) {
  return getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction, actor);
    refuseWhenFinal(season.state);
    const c = await ContestClass.findOne({ where: { id: classId, seasonId }, transaction });
    if (!c) throw notFound('No class with that id in this season.');
    const entries = await Entry.count({ where: { classId }, transaction });
    if (entries) throw conflict(`${entries} ${entries === 1 ? 'entry competes' : 'entries compete'} in ${c.name}; a class with entries cannot be removed.`);
    if (season.state !== 'draft' && (await ContestClass.count({ where: { seasonId }, transaction })) === 1)
      throw conflict('An open season needs at least one class; add another before removing this one.');
    const rules = await Rule.destroy({ where: { classId }, transaction });
    await c.destroy({ transaction });
    await audit('season.class_deleted', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { classId, slug: c.slug, rulesRemoved: rules }, transaction });
  });
}

export async function reorderClasses(actor: Actor, seasonId: number, classIds: number[]) {
  return getSequelize().transaction(async (transaction) => {
    await managedSeason(seasonId, transaction, actor);
    const classes = await seasonClasses(seasonId, transaction);
    const known = new Set(classes.map((c) => c.id));
    if (classIds.length !== known.size || new Set(classIds).size !== classIds.length || classIds.some((id) => !known.has(id)))
      throw badRequest('Send every class of this season exactly once, in the new order.', { classIds: 'The list does not match the season’s classes.' });
    for (const [i, id] of classIds.entries()) await ContestClass.update({ displayOrder: i }, { where: { id, seasonId }, transaction });
    await audit('season.classes_reordered', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { classIds }, transaction });
    return seasonClasses(seasonId, transaction);
  });
}
