/** Who acts and from where, passed from handlers into the season logic for access and audit. */
import type { Transaction } from 'sequelize';
import { Season, type User } from '@/models';
import { notFound } from '@/lib/errors';
import { requireRole } from '@/lib/auth/guard';
import { clientIp } from '@/lib/http';

export interface Actor {
  user: User;
  ip: string | null;
}

/**
 * The season an organizer works on. Every organizer may run every season (clubs share the role);
 * this one function is where a narrower rule (e.g. only the creator) would go.
 */
export async function managedSeason(seasonId: number, transaction?: Transaction): Promise<Season> {
  const season = await Season.findByPk(seasonId, { transaction, lock: transaction ? true : undefined });
  if (!season) throw notFound('No season with that id.');
  return season;
}

/** For organizer route handlers: 401/403 unless the caller has the organizer role. */
export async function requireOrganizer(req: Request): Promise<Actor> {
  const user = await requireRole('organizer');
  return { user, ip: clientIp(req.headers) };
}
