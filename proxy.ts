/**
 * Runs before every request:
 * - security headers that change per request: a Content-Security-Policy with a fresh nonce (the
 *   static headers come from next.config.mjs), HSTS over https;
 * - 405 with an Allow header for a method an API route does not have (and for methods no route
 *   has, like TRACE), from the one list in lib/security/apiRoutes.ts;
 * - routing help: visitors without a session cookie who open a members' page go to sign-in first.
 *   Authorization happens again in every page, route handler and server action.
 */
import { NextResponse, type NextRequest } from 'next/server';
import { matchApiRoute, allowHeader } from '@/lib/security/apiRoutes';
import { contentSecurityPolicy, HSTS_VALUE } from '@/lib/security/headers';

const MEMBER_PREFIXES = ['/me', '/account', '/judging', '/organize', '/admin'];
const SESSION_COOKIES = ['next-auth.session-token', '__Secure-next-auth.session-token'];
const KNOWN_METHODS = new Set(['GET', 'HEAD', 'OPTIONS', 'POST', 'PUT', 'PATCH', 'DELETE']);

function methodNotAllowed(allow: string) {
  return NextResponse.json({ error: `This address does not accept that method. It accepts: ${allow}.` }, { status: 405, headers: { Allow: allow } });
}

function isHttps(req: NextRequest) {
  // Behind a TLS-terminating proxy the app sees http; the proxy says what the browser used.
  const forwarded = process.env.TRUST_PROXY ? req.headers.get('x-forwarded-proto')?.split(',')[0].trim() : null;
  return (forwarded ?? req.nextUrl.protocol.replace(':', '')) === 'https';
}

function withSecurityHeaders(res: NextResponse, csp: string, req: NextRequest) {
  res.headers.set('Content-Security-Policy', csp);
  if (isHttps(req)) res.headers.set('Strict-Transport-Security', HSTS_VALUE);
  return res;
}

export function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  const nonce = Buffer.from(crypto.getRandomValues(new Uint8Array(16))).toString('base64');
  const csp = contentSecurityPolicy(nonce, process.env.NODE_ENV === 'development');

  if (pathname.startsWith('/api/')) {
    const r = matchApiRoute(pathname);
    if (r) {
      const allow = allowHeader(r);
      if (!allow.split(', ').includes(req.method)) return withSecurityHeaders(methodNotAllowed(allow), csp, req);
    } else if (!KNOWN_METHODS.has(req.method)) return withSecurityHeaders(methodNotAllowed('GET, HEAD, OPTIONS'), csp, req);
  } else if (!KNOWN_METHODS.has(req.method)) {
    return withSecurityHeaders(methodNotAllowed('GET, HEAD, OPTIONS, POST'), csp, req);
  }

  if (MEMBER_PREFIXES.some((p) => pathname === p || pathname.startsWith(`${p}/`)) && !SESSION_COOKIES.some((c) => req.cookies.has(c))) {
    const url = req.nextUrl.clone();
    url.pathname = '/signin';
    url.search = `?callbackUrl=${encodeURIComponent(pathname + search)}`;
    return withSecurityHeaders(NextResponse.redirect(url), csp, req);
  }

  // Next.js reads the nonce from the request's CSP header and puts it on its own scripts.
  const requestHeaders = new Headers(req.headers);
  requestHeaders.set('x-nonce', nonce);
  requestHeaders.set('Content-Security-Policy', csp);
  return withSecurityHeaders(NextResponse.next({ request: { headers: requestHeaders } }), csp, req);
}

export const config = {
  // Everything but the build's static files (those get the static headers from next.config.mjs).
  matcher: [{ source: '/((?!_next/static|_next/image|favicon.svg).*)' }],
};
