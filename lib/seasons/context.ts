/** Who acts and from where, passed from handlers into the season logic for access and audit. */
import type { Transaction } from 'sequelize';
import { Season, SeasonOrganizer, type User } from '@/models';
import { notFound } from '@/lib/errors';
import { requireRole } from '@/lib/auth/guard';
import { clientIp } from '@/lib/http';

export interface Actor {
  user: User;
  ip: string | null;
}

/**
 * Organizers are scoped to their seasons: the creator plus the co-organizers they add
 * (`season_organizers`). Seasons of others answer 404, as if they did not exist.
 */
export async function organizesSeason(userId: number, season: Pick<Season, 'id' | 'createdById'>, transaction?: Transaction): Promise<boolean> {
  if (season.createdById === userId) return true;
  return (await SeasonOrganizer.count({ where: { seasonId: season.id, userId }, transaction })) > 0;
}

/** Ids of the seasons this user organizes (created or co-organizes). */
export async function organizedSeasonIds(userId: number): Promise<number[]> {
  const [created, co] = await Promise.all([
    Season.findAll({ where: { createdById: userId }, attributes: ['id'] }),
    SeasonOrganizer.findAll({ where: { userId }, attributes: ['seasonId'] }),
  ]);
  return [...new Set([...created.map((s) => s.id), ...co.map((r) => r.seasonId)])];
}

/**
 * The season an organizer works on: 404 when it does not exist or, with `actor`, when the actor does
 * not organize it. Route handlers, pages and the season functions that receive an actor all pass it.
 */
export async function managedSeason(seasonId: number, transaction?: Transaction, actor?: Pick<Actor, 'user'>): Promise<Season> {
  const season = await Season.findByPk(seasonId, { transaction, lock: transaction ? true : undefined });
  if (!season || (actor && !(await organizesSeason(actor.user.id, season, transaction)))) throw notFound('No season with that id.');
  return season;
}

/** For organizer route handlers: 401/403 unless the caller has the organizer role. */
export async function requireOrganizer(req: Request): Promise<Actor> {
  const user = await requireRole('organizer');
  return { user, ip: clientIp(req.headers) };
}
