/**
 * Runs before page requests that carry no body:
 * - a Content-Security-Policy with a fresh nonce (the static security headers come from
 *   next.config.mjs), HSTS over https;
 * - 405 for a method no page has;
 * - routing help: visitors without a session cookie who open a members' page go to sign-in first.
 *   Authorization happens again in every page, route handler and server action;
 * - public pages for anonymous visitors from lib/standings/pageCache.ts (kept per standings
 *   version, each answer with its own nonce).
 *
 * Not for /api, nor for any request with a body (see `config`): when a proxy runs for a request,
 * Next.js copies its body in memory (up to proxyClientMaxBodySize, 10 MB; the rest is silently cut)
 * and waits for the whole body before the handler starts. Uploads would be truncated, and route()
 * could not refuse an oversized body before it was read.
 */
import { NextResponse, type NextRequest } from 'next/server';
import { contentSecurityPolicy, HSTS_VALUE, isHttpsRequest } from '@/lib/security/headers';
import { hasSessionCookie } from '@/lib/auth/sessionCookie';
import { keptPage, pageCacheable } from '@/lib/standings/pageCache';

const MEMBER_PREFIXES = ['/me', '/account', '/judging', '/organize', '/admin'];
const PAGE_METHODS = 'GET, HEAD, OPTIONS, POST';

function isHttps(req: NextRequest) {
  // Behind a TLS-terminating proxy the app sees http; the proxy says what the browser used.
  return isHttpsRequest(req.headers.get('x-forwarded-proto'), req.nextUrl.protocol);
}

function withSecurityHeaders(res: NextResponse, csp: string, req: NextRequest) {
  res.headers.set('Content-Security-Policy', csp);
  if (isHttps(req)) res.headers.set('Strict-Transport-Security', HSTS_VALUE);
  return res;
}

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  const nonce = Buffer.from(crypto.getRandomValues(new Uint8Array(16))).toString('base64');
  const csp = contentSecurityPolicy(nonce, process.env.NODE_ENV === 'development');

  if (!PAGE_METHODS.split(', ').includes(req.method)) {
    const res = NextResponse.json({ error: `Pages accept ${PAGE_METHODS}.` }, { status: 405, headers: { Allow: PAGE_METHODS } });
    return withSecurityHeaders(res, csp, req);
  }

  if (MEMBER_PREFIXES.some((p) => pathname === p || pathname.startsWith(`${p}/`)) && !hasSessionCookie(req.cookies.getAll().map((c) => c.name))) {
    const url = req.nextUrl.clone();
    url.pathname = '/signin';
    url.search = `?callbackUrl=${encodeURIComponent(pathname + search)}`;
    return withSecurityHeaders(NextResponse.redirect(url), csp, req);
  }

  // Public pages for anonymous visitors: kept per standings version, sent with this response's nonce.
  if (pageCacheable(req)) {
    const kept = await keptPage(req, nonce);
    if (kept) return withSecurityHeaders(new NextResponse(kept.body, { status: kept.status, headers: kept.headers }), csp, req);
  }

  // Next.js reads the nonce from the request's CSP header and puts it on its own scripts.
  const requestHeaders = new Headers(req.headers);
  requestHeaders.set('x-nonce', nonce);
  requestHeaders.set('Content-Security-Policy', csp);
  return withSecurityHeaders(NextResponse.next({ request: { headers: requestHeaders } }), csp, req);
}

export const config = {
  matcher: [
    {
      // Pages only: not the API, the build's static files or the icon (those get the static headers).
      source: '/((?!api/|_next/static|_next/image|favicon.svg).*)',
      // Only requests without a body (a body always comes with one of these two headers in HTTP/1.1).
      missing: [
        { type: 'header', key: 'content-length' },
        { type: 'header', key: 'transfer-encoding' },
      ],
    },
  ],
};
