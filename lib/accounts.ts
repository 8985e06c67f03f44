/** Account lifecycle: sign-up, e-mail confirmation, password reset, roles. */
import 'server-only';
import { UniqueConstraintError } from 'sequelize';
import { User } from '@/models';
import { getSequelize } from '@/lib/db';
import { hashPassword } from '@/lib/auth/password';
import { countMailRequest, clearSignInLimits } from '@/lib/auth/limits';
import { endAllSessions } from '@/lib/auth/sessions';
import { issueToken, consumeToken } from '@/lib/auth/tokens';
import { sendMail, appUrl, linkMail } from '@/lib/mail';
import { audit } from '@/lib/audit';
import { ROLES, type Role } from '@/lib/domain';
import { HttpError, notFound } from '@/lib/errors';
import type { SignUpInput } from '@/lib/auth/schemas';

/** What sign-up and reset requests answer, whatever the address: it must not reveal accounts. */
export const SIGNUP_SENT =
  'Check your inbox. If the address is new, we sent a link to confirm it; if it already has an account, we sent a sign-in reminder instead.';
export const RESET_SENT =
  'If an account uses that address, we sent it a link to choose a new password. The link works for one hour.';

async function sendVerification(user: User) {
  const token = await issueToken(user.id, 'verify');
  await sendMail(
    linkMail(
      user.email,
      'Confirm your e-mail for Hotlap',
      `Hello ${user.name}, confirm this address to finish creating your Hotlap account.`,
      'Confirm my e-mail',
      appUrl(`/verify?token=${token}`),
      'The link works for 24 hours. If you did not sign up, ignore this message.',
    ),
  );
}

/** Runs work now, or later: route handlers pass Next.js's `after` so it runs once the answer is sent. */
export type Defer = (work: () => Promise<void>) => void | Promise<void>;
const now: Defer = (work) => work();

/**
 * Same answer, same timing, whether the address is taken: the limit check and the password hash
 * (the expensive part) happen for both before answering; looking the address up, creating the
 * account and mailing (a confirmation link, or a reminder to the owner) happen in `defer`, after
 * the answer is sent.
 */
export async function signUp(input: SignUpInput, ip: string | null, defer: Defer = now): Promise<{ message: string }> {
  await countMailRequest(input.email, ip);
  const passwordHash = await hashPassword(input.password);
  await defer(async () => {
    const existing = await User.findOne({ where: { email: input.email } });
    if (existing) return sendAccountExists(existing.email);
    let user: User;
    try {
      user = await User.create({ email: input.email, name: input.name, passwordHash, roles: ['entrant'], emailVerifiedAt: null });
    } catch (err) {
      // Two sign-ups for one address at once: the second finds it taken, like any later one.
      if (err instanceof UniqueConstraintError) return sendAccountExists(input.email);
      throw err;
    }
    await audit('user.signup', { type: 'user', id: user.id }, { actorId: user.id, ip });
    await sendVerification(user);
  });
  return { message: SIGNUP_SENT };
}

/** Tells the owner of the address, not the person at the form. */
async function sendAccountExists(email: string): Promise<void> {
  await sendMail(
    linkMail(
      email,
      'You already have a Hotlap account',
      'Someone (maybe you) tried to create a Hotlap account with this address, which already has one. Nothing was changed.',
      'Reset your password',
      appUrl('/forgot'),
      'If it was not you, you can ignore this message.',
    ),
  );
}

/**
 * Sent when a link is asked for an address with no account (or one already confirmed): the person
 * at the form cannot tell the cases apart, by the answer or by its timing, since a mail goes out
 * either way; the owner of the mailbox learns what happened.
 */
async function sendNoLinkNotice(email: string, what: string): Promise<void> {
  await sendMail(
    linkMail(
      email,
      'About your Hotlap request',
      `Someone (maybe you) asked Hotlap for ${what} for this address. There is no link to send: the address has no Hotlap account, or is already confirmed.`,
      'Go to Hotlap',
      appUrl('/signin'),
      'If it was not you, you can ignore this message.',
    ),
  );
}

export async function resendVerification(email: string, ip: string | null = null, defer: Defer = now): Promise<{ message: string }> {
  await countMailRequest(email, ip);
  await defer(async () => {
    const user = await User.findOne({ where: { email } });
    if (user && !user.emailVerifiedAt) await sendVerification(user);
    else await sendNoLinkNotice(email, 'a new confirmation link');
  });
  return { message: SIGNUP_SENT };
}

export async function verifyEmail(token: string, ip: string | null): Promise<{ email: string }> {
  return getSequelize().transaction(async (transaction) => {
    const userId = await consumeToken(token, 'verify', transaction);
    const user = await User.findByPk(userId, { transaction });
    if (!user) throw new HttpError(400, 'This confirmation link belongs to an account that no longer exists.');
    if (!user.emailVerifiedAt) await user.update({ emailVerifiedAt: new Date() }, { transaction });
    await audit('user.verify', { type: 'user', id: user.id }, { actorId: user.id, ip, transaction });
    return { email: user.email };
  });
}


/**
 * The answer is the same whether the address has an account, and so is its timing: only the limit
 * check happens before answering; looking the address up, issuing the link and sending the mail (a
 * reset link, or a notice that there is no account) happen in `defer`, after the answer is sent.
 */
export async function requestPasswordReset(email: string, ip: string | null = null, defer: Defer = now): Promise<{ message: string }> {
  await countMailRequest(email, ip);
  await defer(async () => {
    const user = await User.findOne({ where: { email } });
    if (!user) return sendNoLinkNotice(email, 'a password reset link');
    const token = await issueToken(user.id, 'reset');
    await sendMail(
      linkMail(
        user.email,
        'Choose a new Hotlap password',
        `Hello ${user.name}, someone asked to reset the password of your Hotlap account.`,
        'Choose a new password',
        appUrl(`/reset?token=${token}`),
        'The link works for one hour and only once. If you did not ask, ignore this message: your password stays as it is.',
      ),
    );
  });
  return { message: RESET_SENT };
}

export async function confirmPasswordReset(token: string, password: string, ip: string | null) {
  const passwordHash = await hashPassword(password);
  return getSequelize().transaction(async (transaction) => {
    const userId = await consumeToken(token, 'reset', transaction);
    const user = await User.findByPk(userId, { transaction });
    if (!user) throw new HttpError(400, 'This reset link belongs to an account that no longer exists.');
    // Following the link proves control of the mailbox, so the address counts as confirmed too.
    await user.update({ passwordHash, emailVerifiedAt: user.emailVerifiedAt ?? new Date() }, { transaction });
    // A new password ends every session signed in with the old one (a thief's too).
    await endAllSessions(user.id, transaction);
    await audit('user.password_reset', { type: 'user', id: user.id }, { actorId: user.id, ip, transaction });
    return { email: user.email };
  }).then(async (done) => {
    // Proof of the mailbox: the owner gets past any sign-in limit a stranger ran up on the account.
    await clearSignInLimits(done.email, ip);
    return done;
  });
}

/** "Sign out everywhere": every session of the account ends, this one included. */
export async function signOutEverywhere(user: User, ip: string | null) {
  await endAllSessions(user.id);
  await audit('user.sessions_ended', { type: 'user', id: user.id }, { actorId: user.id, ip });
}

/** Sets a user's roles (entrant is always kept). Admins cannot remove their own admin role. */
export async function setRoles(actor: User, userId: number, roles: Role[], ip: string | null) {
  return getSequelize().transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction });
    if (!user) throw notFound('No account with that id.');
    const next = ROLES.filter((r) => r === 'entrant' || roles.includes(r));
    if (actor.id === user.id && !next.includes('admin'))
      throw new HttpError(409, 'You cannot remove your own admin role; ask another admin.');
    const before = user.roles;
    await user.update({ roles: [...next] }, { transaction });
    // Sessions from before the change end: the person signs in again under the new roles.
    // Compared as sets: a stored list in another order is the same roles.
    if (before.length !== next.length || before.some((r) => !next.includes(r))) await endAllSessions(user.id, transaction);
    await audit('user.roles_changed', { type: 'user', id: user.id }, { actorId: actor.id, ip, details: { before, after: next }, transaction });
    return user;
  });
}
