/**
 * Routing help only: visitors without a session cookie who open a members' page go to sign-in
 * first. Authorization happens again in every page, route handler and server action.
 */
import { NextResponse, type NextRequest } from 'next/server';

const MEMBER_PREFIXES = ['/me', '/judging', '/organize', '/admin'];
const SESSION_COOKIES = ['next-auth.session-token', '__Secure-next-auth.session-token'];

export function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  if (!MEMBER_PREFIXES.some((p) => pathname === p || pathname.startsWith(`${p}/`))) return NextResponse.next();
  if (SESSION_COOKIES.some((c) => req.cookies.has(c))) return NextResponse.next();
  const url = req.nextUrl.clone();
  url.pathname = '/signin';
  url.search = `?callbackUrl=${encodeURIComponent(pathname + search)}`;
  return NextResponse.redirect(url);
}

export const config = { matcher: ['/me/:path*', '/judging/:path*', '/organize/:path*', '/admin/:path*'] };
