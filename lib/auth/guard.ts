/**
 * The one server-side authorization gate. Every protected route handler, server action and page
 * calls one of these; proxy.ts only redirects for convenience and is never trusted.
 */
import { getServerSession } from 'next-auth';
import { redirect, forbidden as forbiddenPage } from 'next/navigation';
import { authOptions } from '@/lib/auth/options';
import type { User } from '@/models';
import { loadUser } from '@/lib/auth/loadUser';
import type { Role } from '@/lib/domain';
import { forbidden, unauthorized } from '@/lib/errors';

export async function currentUser(): Promise<User | null> {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  return loadUser(id);
}

export function hasRole(user: Pick<User, 'roles'> | null | undefined, roles: readonly Role[]): boolean {
  return !!user && roles.some((r) => user.roles.includes(r));
}

/** For route handlers and server actions: throws 401 / 403 HttpErrors. */
export async function requireUser(): Promise<User> {
  const user = await currentUser();
  if (!user) throw unauthorized();
  return user;
}

export async function requireRole(...roles: Role[]): Promise<User> {
  const user = await requireUser();
  if (!hasRole(user, roles)) throw forbidden(`This needs the ${roles.join(' or ')} role.`);
  return user;
}

/** For pages: sends anonymous visitors to sign-in (coming back afterwards), others to the 403 page. */
export async function requirePageRole(path: string, ...roles: Role[]): Promise<User> {
  const user = await currentUser();
  if (!user) redirect(`/signin?callbackUrl=${encodeURIComponent(path)}`);
  if (roles.length && !hasRole(user, roles)) forbiddenPage();
  return user;
}
