/**
 * Judges of a season: appointed from existing accounts (the judge role is granted when missing,
 * audited like any role change) or invited by e-mail. An invitation link carries a random token
 * (only its SHA-256 is stored) and is accepted by whoever signs in with the invited address.
 */
import crypto from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { JudgeInvitation, Season, SeasonJudge, User } from '@/models';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { sendMail, appUrl, linkMail } from '@/lib/mail';
import { HttpError, conflict, notFound } from '@/lib/errors';
import { ROLES } from '@/lib/domain';
import { managedSeason, type Actor } from '@/lib/seasons/context';
import { competingClasses } from '@/lib/reviews/conflicts';

export const INVITATION_TTL_MS = 7 * 24 * 3600_000;
const sha256 = (s: string) => crypto.createHash('sha256').update(s).digest('hex');

function refuseWhenClosed(season: Season) {
  if (season.state === 'final' || season.state === 'archived') throw conflict(`The season is ${season.state}: judging is over, so its judges no longer change.`);
}

/** An organizer who competes in the season cannot make themselves its judge. */
function selfJudgeRefusal(classes: { name: string }[]) {
  const msg = `You have an entry in ${classes.map((c) => c.name).join(', ')} this season, so you cannot judge it yourself. Appoint someone who does not compete.`;
  return conflict(msg, { email: msg });
}

/** Grants the judge role if missing; audited as a role change. */
async function ensureJudgeRole(user: User, actorId: number, ip: string | null, why: string, transaction: Transaction) {
  if (user.roles.includes('judge')) return;
  const before = user.roles;
  const after = ROLES.filter((r) => r === 'judge' || before.includes(r));
  await user.update({ roles: [...after] }, { transaction });
  await audit('user.roles_changed', { type: 'user', id: user.id }, { actorId, ip, details: { before, after, reason: why }, transaction });
}

export async function seasonJudges(seasonId: number) {
  const [rows, invitations] = await Promise.all([
    SeasonJudge.findAll({ where: { seasonId }, order: [['createdAt', 'ASC']] }),
    JudgeInvitation.findAll({ where: { seasonId, acceptedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } }, order: [['createdAt', 'ASC']] }),
  ]);
  const users = await User.findAll({ where: { id: rows.map((r) => r.userId) }, attributes: ['id', 'name', 'email'] });
  const byId = new Map(users.map((u) => [u.id, u]));
  // Classes each judge competes in this season: they neither see nor decide those entries.
  const conflicts = await Promise.all(rows.map((r) => competingClasses(r.userId, seasonId)));
  return {
    judges: rows.map((r, i) => ({ userId: r.userId, name: byId.get(r.userId)?.name ?? '—', email: byId.get(r.userId)?.email ?? '', appointedAt: r.createdAt.toISOString(), conflicts: conflicts[i] })),
    invitations: invitations.map((i) => ({ id: i.id, email: i.email, expiresAt: i.expiresAt.toISOString(), sentAt: i.createdAt.toISOString() })),
  };
}

export async function appointJudge(actor: Actor, seasonId: number, email: string) {
  const { season, user, conflicts } = await getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction, actor);
    refuseWhenClosed(season);
    const user = await User.findOne({ where: { email }, transaction });
    if (!user) throw new HttpError(404, 'No account uses that address.', { email: 'No account uses this address; send an invitation instead.' });
    if (await SeasonJudge.findOne({ where: { seasonId, userId: user.id }, transaction }))
      throw conflict(`${user.name} already judges this season.`, { email: `${user.name} already judges this season.` });
    const conflicts = await competingClasses(user.id, seasonId, transaction);
    if (user.id === actor.user.id && conflicts.length) throw selfJudgeRefusal(conflicts);
    await ensureJudgeRole(user, actor.user.id, actor.ip, `appointed judge of season ${season.slug}`, transaction);
    await SeasonJudge.create({ seasonId, userId: user.id, appointedById: actor.user.id }, { transaction });
    await audit('season.judge_appointed', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { userId: user.id }, transaction });
    return { season, user, conflicts };
  });
  await sendMail(linkMail(user.email, `You judge ${season.name}`, `Hello ${user.name}, ${actor.user.name} appointed you as a judge of ${season.name}. Submitted entries of this season appear on your review desk.`, 'Open the review desk', appUrl('/judging'), 'You never see or decide your own entries.'));
  return { userId: user.id, name: user.name, conflicts };
}

export async function removeJudge(actor: Actor, seasonId: number, userId: number) {
  return getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction, actor);
    refuseWhenClosed(season);
    const removed = await SeasonJudge.destroy({ where: { seasonId, userId }, transaction });
    if (!removed) throw notFound('That account does not judge this season.');
    // The judge role stays: the person may judge other seasons. Their past reviews stay too.
    await audit('season.judge_removed', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { userId }, transaction });
  });
}

export async function inviteJudge(actor: Actor, seasonId: number, email: string, now = new Date()) {
  const token = crypto.randomBytes(32).toString('base64url');
  const { season, invitation } = await getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction, actor);
    refuseWhenClosed(season);
    const existing = await User.findOne({ where: { email }, attributes: ['id', 'name'], transaction });
    if (existing?.id === actor.user.id) {
      const mine = await competingClasses(actor.user.id, seasonId, transaction);
      if (mine.length) throw selfJudgeRefusal(mine);
    }
    if (existing && (await SeasonJudge.findOne({ where: { seasonId, userId: existing.id }, transaction })))
      throw conflict(`${existing.name} already judges this season.`, { email: 'This address already judges this season.' });
    // A newer invitation replaces an older one to the same address.
    await JudgeInvitation.update({ revokedAt: now }, { where: { seasonId, email, acceptedAt: null, revokedAt: null }, transaction });
    const invitation = await JudgeInvitation.create(
      { seasonId, email, tokenHash: sha256(token), invitedById: actor.user.id, expiresAt: new Date(now.getTime() + INVITATION_TTL_MS), acceptedAt: null, acceptedById: null, revokedAt: null },
      { transaction },
    );
    await audit('season.judge_invited', { type: 'season', id: seasonId }, { actorId: actor.user.id, ip: actor.ip, details: { email, invitationId: invitation.id }, transaction });
    return { season, invitation };
  });
  await sendMail(
    linkMail(
      email,
      `Invitation to judge ${season.name}`,
      `${actor.user.name} invites you to judge ${season.name}, hosted by ${season.hostName}. Judges verify, reject or return submitted timed prints against the rulebook.`,
      'Accept the invitation',
      appUrl(`/invite?token=${token}`),
      `Sign in (or create an account) with this address, ${email}, to accept. The link works for 7 days.`,
    ),
  );
  return { id: invitation.id, email, expiresAt: invitation.expiresAt.toISOString() };
}

export async function revokeInvitation(actor: Actor, seasonId: number, invitationId: number) {
  return getSequelize().transaction(async (transaction) => {
    await managedSeason(seasonId, transaction, actor);
    const [n] = await JudgeInvitation.update({ revokedAt: new Date() }, { where: { id: invitationId, seasonId, acceptedAt: null, revokedAt: null }, transaction });
    if (!n) throw notFound('No open invitation with that id in this season.');
  });
}

export type InvitationView =
  | { status: 'valid'; email: string; seasonName: string; seasonSlug: string; hostName: string }
  | { status: 'unknown' | 'expired' | 'used' | 'revoked'; message: string };

const INVITE_MESSAGES = {
  unknown: 'This invitation link is not valid. Copy the whole link from the e-mail.',
  expired: 'This invitation has expired (links last 7 days). Ask the organizer for a new one.',
  used: 'This invitation has already been accepted.',
  revoked: 'This invitation was withdrawn or replaced by a newer one. Use the latest e-mail.',
} as const;

async function findInvitation(token: string, transaction?: Transaction) {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return null;
  return JudgeInvitation.findOne({ where: { tokenHash: sha256(token) }, transaction, lock: transaction ? true : undefined });
}

function invitationProblem(inv: JudgeInvitation | null, now: Date): keyof typeof INVITE_MESSAGES | null {
  if (!inv) return 'unknown';
  if (inv.acceptedAt) return 'used';
  if (inv.revokedAt) return 'revoked';
  if (inv.expiresAt.getTime() <= now.getTime()) return 'expired';
  return null;
}

export async function viewInvitation(token: string, now = new Date()): Promise<InvitationView> {
  const inv = await findInvitation(token);
  const problem = invitationProblem(inv, now);
  if (problem) return { status: problem, message: INVITE_MESSAGES[problem] };
  const season = await Season.findByPk(inv!.seasonId);
  if (!season) return { status: 'unknown', message: INVITE_MESSAGES.unknown };
  return { status: 'valid', email: inv!.email, seasonName: season.name, seasonSlug: season.slug, hostName: season.hostName };
}

/** The signed-in person accepts: only with the invited address. */
export async function acceptInvitation(user: User, token: string, ip: string | null, now = new Date()) {
  return getSequelize().transaction(async (transaction) => {
    const inv = await findInvitation(token, transaction);
    const problem = invitationProblem(inv, now);
    if (problem) throw new HttpError(problem === 'unknown' ? 400 : 410, INVITE_MESSAGES[problem], undefined, `invitation_${problem}`);
    if (user.email.toLowerCase() !== inv!.email.toLowerCase())
      throw new HttpError(403, `This invitation was sent to ${inv!.email}, but you are signed in as ${user.email}. Sign out and sign in with the invited address.`, undefined, 'invitation_other_address');
    const season = await Season.findByPk(inv!.seasonId, { transaction });
    if (!season) throw new HttpError(400, INVITE_MESSAGES.unknown);
    refuseWhenClosed(season);
    const fresh = (await User.findByPk(user.id, { transaction }))!;
    await ensureJudgeRole(fresh, fresh.id, ip, `accepted invitation ${inv!.id} to judge season ${season.slug}`, transaction);
    await SeasonJudge.findOrCreate({ where: { seasonId: season.id, userId: fresh.id }, defaults: { seasonId: season.id, userId: fresh.id, appointedById: inv!.invitedById ?? null }, transaction });
    await inv!.update({ acceptedAt: now, acceptedById: fresh.id }, { transaction });
    await audit('season.judge_invitation_accepted', { type: 'season', id: season.id }, { actorId: fresh.id, ip, details: { invitationId: inv!.id, userId: fresh.id }, transaction });
    return { seasonName: season.name, seasonSlug: season.slug };
  });
}
