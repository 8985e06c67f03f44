/**
 * Ending sessions before their cookie expires. Sessions are JWTs in a cookie (next-auth), which a
 * server cannot delete from every browser, so each session carries two claims checked on every read
 * (lib/auth/options.ts, jwt callback):
 * - `sv`, the account's session version when it was issued. A password change or reset, "sign out
 *   everywhere" and a role change by an admin bump `users.session_version`: all older sessions end.
 * - `sid`, a random id for this one sign-in. Signing out puts it in `revoked_sessions` (until the
 *   session would have expired anyway), so a copy of the cookie taken before sign-out stops
 *   working too, while the same person's other devices stay signed in. A revoked-id list rather
 *   than bumping the version, because signing out of one browser should not sign out all of them.
 */
import crypto from 'node:crypto';
import { Op, QueryTypes, type Transaction } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { User } from '@/models';

export const SESSION_MAX_AGE_S = 30 * 24 * 3600;

export const newSessionId = () => crypto.randomBytes(18).toString('base64url');

export async function revokeSession(sid: string, expiresAtMs = Date.now() + SESSION_MAX_AGE_S * 1000) {
  const sequelize = getSequelize();
  // Portable "insert unless present" (SQLite and PostgreSQL both have ON CONFLICT DO NOTHING).
  await sequelize.query('INSERT INTO revoked_sessions (sid, expires_at) VALUES (?, ?) ON CONFLICT (sid) DO NOTHING', {
    replacements: [sid, expiresAtMs],
  });
  // Old entries can go: their sessions have expired on their own.
  await sequelize.query('DELETE FROM revoked_sessions WHERE expires_at < ?', { replacements: [Date.now()] });
}

export async function isRevoked(sid: string): Promise<boolean> {
  const rows = await getSequelize().query('SELECT 1 AS one FROM revoked_sessions WHERE sid = ?', { replacements: [sid], type: QueryTypes.SELECT });
  return rows.length > 0;
}

/** Ends every session of the account (atomic increment; works inside the caller's transaction). */
export async function endAllSessions(userId: number, transaction?: Transaction) {
  await User.increment('sessionVersion', { by: 1, where: { id: { [Op.eq]: userId } }, transaction });
}

export interface SessionClaims {
  uid?: number;
  sv?: number;
  sid?: string;
}

/** True when the token's account exists, its version is current and its id was not signed out. */
export async function sessionIsLive(claims: SessionClaims, user: Pick<User, 'sessionVersion'> | null): Promise<boolean> {
  if (!user || typeof claims.sid !== 'string' || claims.sv !== user.sessionVersion) return false;
  return !(await isRevoked(claims.sid));
}
