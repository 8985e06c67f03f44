/**
 * One-time links. The token (32 random bytes, base64url → 43 chars) goes only into the e-mail; the
 * database keeps its SHA-256, so a leaked database cannot be turned into working links.
 */
import 'server-only';
import crypto from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { AuthToken } from '@/models';
import type { TokenPurpose } from '@/lib/domain';
import { HttpError } from '@/lib/errors';

export const TOKEN_TTL_MS: Record<TokenPurpose, number> = {
  verify: 24 * 3600_000,
  reset: 3600_000,
};

const sha256 = (s: string) => crypto.createHash('sha256').update(s).digest('hex');

export async function issueToken(userId: number, purpose: TokenPurpose, now = new Date()): Promise<string> {
  const token = crypto.randomBytes(32).toString('base64url');
  // An older unused link of the same purpose stops working when a new one is sent.
  await AuthToken.update({ usedAt: now }, { where: { userId, purpose, usedAt: { [Op.is]: null } } });
  await AuthToken.create({ userId, purpose, tokenHash: sha256(token), expiresAt: new Date(now.getTime() + TOKEN_TTL_MS[purpose]), usedAt: null });
  return token;
}

const MESSAGES: Record<TokenPurpose, { used: string; expired: string; unknown: string }> = {
  verify: {
    used: 'This confirmation link has already been used. Sign in, or ask for a new link.',
    expired: 'This confirmation link has expired. Sign in to get a new one.',
    unknown: 'This confirmation link is not valid. Copy the whole link from the e-mail.',
  },
  reset: {
    used: 'This reset link has already been used. Ask for a new one if you still need it.',
    expired: 'This reset link has expired (links last one hour). Ask for a new one.',
    unknown: 'This reset link is not valid. Copy the whole link from the e-mail.',
  },
};

/** Marks the token used and returns its user id, or throws a 400/410 with a sentence to act on. */
export async function consumeToken(token: string, purpose: TokenPurpose, transaction: Transaction, now = new Date()): Promise<number> {
  const row = await AuthToken.findOne({ where: { tokenHash: sha256(token), purpose }, transaction, lock: true });
  if (!row) throw new HttpError(400, MESSAGES[purpose].unknown, { token: MESSAGES[purpose].unknown }, 'token_unknown');
  if (row.usedAt) throw new HttpError(410, MESSAGES[purpose].used, { token: MESSAGES[purpose].used }, 'token_used');
  if (row.expiresAt.getTime() <= now.getTime())
    throw new HttpError(410, MESSAGES[purpose].expired, { token: MESSAGES[purpose].expired }, 'token_expired');
  // Conditional update: of two concurrent uses only one sees a changed row.
  const [changed] = await AuthToken.update({ usedAt: now }, { where: { id: row.id, usedAt: { [Op.is]: null } }, transaction });
  if (changed !== 1) throw new HttpError(410, MESSAGES[purpose].used, { token: MESSAGES[purpose].used }, 'token_used');
  return row.userId as number;
}
