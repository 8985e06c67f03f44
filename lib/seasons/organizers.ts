/**
 * Who runs a season: its creator plus co-organizers the season's organizers add by e-mail. Only
 * accounts with the organizer role can be added (an admin grants it); the creator cannot be removed.
 */
import { Season, SeasonOrganizer, User } from '@/models';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError, conflict, notFound } from '@/lib/errors';
import { managedSeason, type Actor } from '@/lib/seasons/context';

export interface SeasonOrganizerView {
  userId: number;
  name: string;
  email: string;
  creator: boolean;
}

export async function seasonOrganizers(season: Pick<Season, 'id' | 'createdById'>): Promise<SeasonOrganizerView[]> {
  const rows = await SeasonOrganizer.findAll({ where: { seasonId: season.id }, order: [['createdAt', 'ASC']] });
  const ids = [...(season.createdById ? [season.createdById] : []), ...rows.map((r) => r.userId)];
  const users = await User.findAll({ where: { id: ids }, attributes: ['id', 'name', 'email'] });
  const byId = new Map(users.map((u) => [u.id, u]));
  return [...new Set(ids)].map((id) => ({ userId: id, name: byId.get(id)?.name ?? '—', email: byId.get(id)?.email ?? '', creator: id === season.createdById }));
}

export async function addCoOrganizer(actor: Actor, seasonId: number, email: string) {
  return getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction, actor);
    const user = await User.findOne({ where: { email }, transaction });
    if (!user) throw new HttpError(404, 'No account uses that address.', { email: 'No account uses this address; ask them to sign up first.' });
    if (!user.roles.includes('organizer'))
      throw new HttpError(422, `${user.name} does not have the organizer role.`, { email: `${user.name} does not have the organizer role yet; an administrator grants it.` });
    if (user.id === season.createdById || (await SeasonOrganizer.count({ where: { seasonId, userId: user.id }, transaction })))
      throw conflict(`${user.name} already organizes this season.`, { email: `${user.name} already organizes this season.` });
    await SeasonOrganizer.create({ seasonId, userId: user.id, addedById: actor.user.id }, { transaction });
    await audit('season.organizer_added', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { userId: user.id }, transaction });
    return { userId: user.id, name: user.name, email: user.email, creator: false };
  });
}

export async function removeCoOrganizer(actor: Actor, seasonId: number, userId: number) {
  return getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction, actor);
    if (userId === season.createdById) throw conflict('The season’s creator always organizes it and cannot be removed.');
    const removed = await SeasonOrganizer.destroy({ where: { seasonId, userId }, transaction });
    if (!removed) throw notFound('That account does not co-organize this season.');
    await audit('season.organizer_removed', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { userId }, transaction });
  });
}
