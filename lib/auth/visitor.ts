/**
 * The signed-in visitor of a public page, read only when the request carries a session cookie: an
 * anonymous visitor costs no session decoding and no database read. Authorization still happens in
 * every protected page, route handler and action (lib/auth/guard.ts).
 */
import { cookies } from 'next/headers';
import { currentUser } from '@/lib/auth/guard';
import { hasSessionCookie } from '@/lib/auth/sessionCookie';

export async function mayBeSignedIn(): Promise<boolean> {
  return hasSessionCookie((await cookies()).getAll().map((c) => c.name));
}

export async function visitorUser() {
  return (await mayBeSignedIn()) ? currentUser() : null;
}
