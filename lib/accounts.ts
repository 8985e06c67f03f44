/** Account lifecycle: sign-up, e-mail confirmation, password reset, roles. */
import { User } from '@/models';
import { getSequelize } from '@/lib/db';
import { hashPassword } from '@/lib/auth/password';
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

export async function signUp(input: SignUpInput, ip: string | null): Promise<{ message: string }> {
  const existing = await User.findOne({ where: { email: input.email } });
  if (existing) {
    // Tell the owner of the address, not the person at the form.
    await sendMail(
      linkMail(
        existing.email,
        'You already have a Hotlap account',
        'Someone (maybe you) tried to create a Hotlap account with this address, which already has one. Nothing was changed.',
        'Reset your password',
        appUrl('/forgot'),
        'If it was not you, you can ignore this message.',
      ),
    );
    return { message: SIGNUP_SENT };
  }
  const user = await User.create({
    email: input.email,
    name: input.name,
    passwordHash: await hashPassword(input.password),
    roles: ['entrant'],
    emailVerifiedAt: null,
  });
  await audit('user.signup', { type: 'user', id: user.id }, { actorId: user.id, ip });
  await sendVerification(user);
  return { message: SIGNUP_SENT };
}

export async function resendVerification(email: string): Promise<{ message: string }> {
  const user = await User.findOne({ where: { email } });
  if (user && !user.emailVerifiedAt) await sendVerification(user);
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

export async function requestPasswordReset(email: string): Promise<{ message: string }> {
  const user = await User.findOne({ where: { email } });
  if (user) {
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
  }
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
    await audit('user.password_reset', { type: 'user', id: user.id }, { actorId: user.id, ip, transaction });
    return { email: user.email };
  });
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
    await audit('user.roles_changed', { type: 'user', id: user.id }, { actorId: actor.id, ip, details: { before, after: next }, transaction });
    return user;
  });
}
