/**
 * Conflicts of interest. A judge who has an entry in a class of a season (any state but withdrawn:
 * a draft already says they compete) neither sees that class's entries on their review desk nor
 * decides them; the decision path checks it again inside its write transaction.
 */
import { Op, type Transaction } from 'sequelize';
import { ContestClass, Entry } from '@/models';
import { HttpError } from '@/lib/errors';

const classKey = (seasonId: number, classId: number) => `${seasonId}:${classId}`;

/** Season/class pairs in which the user competes, as `seasonId:classId` keys. */
export async function competingClassKeys(userId: number, seasonIds?: number[], transaction?: Transaction): Promise<Set<string>> {
  const rows = await Entry.findAll({
    where: { entrantId: userId, state: { [Op.ne]: 'withdrawn' }, ...(seasonIds ? { seasonId: seasonIds } : {}) },
    attributes: ['seasonId', 'classId'],
    transaction,
  });
  return new Set(rows.map((r) => classKey(r.seasonId, r.classId)));
}

export const isConflicted = (keys: Set<string>, entry: { seasonId: number; classId: number }) => keys.has(classKey(entry.seasonId, entry.classId));

/** Classes of one season in which the user competes (id and name), for the organizer's judges screen. */
export async function competingClasses(userId: number, seasonId: number, transaction?: Transaction): Promise<{ id: number; name: string }[]> {
  const keys = await competingClassKeys(userId, [seasonId], transaction);
  const ids = [...keys].map((k) => Number(k.split(':')[1]));
  if (!ids.length) return [];
  const classes = await ContestClass.findAll({ where: { id: ids }, attributes: ['id', 'name'], order: [['displayOrder', 'ASC'], ['id', 'ASC']], transaction });
  return classes.map((c) => ({ id: c.id, name: c.name }));
}

/** The sentence a conflicted judge gets when trying to open or decide an entry of a class they compete in. */
export async function conflictSentence(judgeId: number, entry: { seasonId: number; classId: number }, transaction?: Transaction): Promise<string | null> {
  const n = await Entry.count({ where: { entrantId: judgeId, seasonId: entry.seasonId, classId: entry.classId, state: { [Op.ne]: 'withdrawn' } }, transaction });
  if (!n) return null;
  const cls = await ContestClass.findByPk(entry.classId, { attributes: ['name'], transaction });
  return `You have an entry in ${cls?.name ?? 'this class'} this season, so another judge of the season decides its entries.`;
}

/** Throws 403 with the sentence when the judge competes in the entry's class. Call inside the decision's transaction. */
export async function refuseConflictedJudge(judgeId: number, entry: { seasonId: number; classId: number }, transaction?: Transaction): Promise<void> {
  const sentence = await conflictSentence(judgeId, entry, transaction);
  if (sentence) throw new HttpError(403, sentence, undefined, 'conflict_of_interest');
}
