/**
 * The session cookie's names (next-auth's JWT session; the `__Secure-` name over https). A session
 * larger than one cookie is split into `NAME.0`, `NAME.1`…, so those count too. Without any of them a
 * request cannot carry a session: pages and the proxy skip the session read for anonymous visitors.
 */
export const SESSION_COOKIES = ['next-auth.session-token', '__Secure-next-auth.session-token'] as const;

export function hasSessionCookie(names: Iterable<string>): boolean {
  for (const n of names) if (SESSION_COOKIES.some((c) => n === c || n.startsWith(`${c}.`))) return true;
  return false;
}
