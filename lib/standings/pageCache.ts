/**
 * Whole public pages for anonymous visitors, kept per value of the standings change counter and
 * sent again with a fresh CSP nonce (proxy.ts). The per-request nonce stays: a kept page is stored
 * with the nonce it was rendered with, and every answer replaces that value with the nonce of its
 * own response before sending. The stored value never leaves the server, and whatever a page
 * shows was rendered before that nonce existed, so nothing in it can carry the nonce of any
 * response — the same guarantee as rendering each request.
 *
 * - Only GET requests for the listed public paths that ask for HTML (Accept: text/html), without a
 *   session cookie; never the RSC requests of client-side navigation nor server actions.
 * - A miss renders the page once through the app itself (a request to this server marked with a
 *   per-process secret, which the proxy lets through to the normal render); concurrent misses of the
 *   same page share that render. Only a 200 text/html answer without cookies is kept.
 * - The counter is read before rendering, so a kept page is never older than its version; any
 *   write a public page shows bumps the counter in the database (triggers), so the very next
 *   request on any web server sharing the database renders afresh.
 * HOTLAP_PAGE_CACHE=0 turns it off.
 */
import crypto from 'node:crypto';
import { hasSessionCookie } from '@/lib/auth/sessionCookie';
import { standingsVersion } from './query';
import { StandingsParamsSchema } from './params';
import { clearKept, keepEntry, keepMarker, keptFor, OTHER_ANSWERS, RENDER_HEADER, type KeptEntry } from './keptAnswers';

/**
 * The kept pages and the query parameters each one reads. A request with any other parameter is
 * rendered for itself, not kept: made-up query strings (`/?x=1`, `?x=2`…) cannot push the kept
 * pages out of the store (values of known parameters still can; the store is bounded).
 */
const PATHS: [RegExp, readonly string[]][] = [
  [/^\/$/, []],
  [/^\/seasons\/[a-z0-9][a-z0-9-]{0,63}$/, []],
  [/^\/seasons\/[a-z0-9][a-z0-9-]{0,63}\/classes\/[a-z0-9][a-z0-9-]{0,63}$/, Object.keys(StandingsParamsSchema.shape)],
  [/^\/entries\/[1-9]\d{0,15}$/, []],
];
/*
 * Requests of client-side navigation and actions ask for other answers than the HTML page
 * (OTHER_ANSWERS). Next.js strips its RSC headers (and `_rsc`) from the request the proxy sees, so
 * those checks are a second line only; the first is that a page load asks for HTML (Accept:
 * text/html, as browsers send for a document) while the router's fetches do not.
 */
const SECRET = crypto.randomBytes(18).toString('base64url');
/** Headers of the render not copied: this answer sets its own CSP and security headers; length and encoding change. */
const NOT_COPIED = new Set([
  'content-security-policy', 'strict-transport-security', 'content-length', 'content-encoding', 'transfer-encoding', 'connection', 'keep-alive', 'date', 'set-cookie',
  'x-frame-options', 'x-content-type-options', 'referrer-policy', 'permissions-policy', 'cross-origin-opener-policy',
]);

interface Kept {
  version: number;
  html: string;
  nonce: string;
  headers: [string, string][];
}
const rendering = new Map<string, Promise<Rendered>>();
/** A render slower than this is given up; the visitor then gets a render of their own. */
const RENDER_TIMEOUT_MS = 30_000;

interface PageRequest {
  method: string;
  headers: Headers;
  nextUrl: { pathname: string; search: string; searchParams: URLSearchParams };
  cookies: { getAll(): { name: string }[] };
}

/** The render the cache itself asked for (let through to the app). */
export function isCacheRender(req: PageRequest): boolean {
  return req.headers.get(RENDER_HEADER) === SECRET;
}

export function pageCacheable(req: PageRequest): boolean {
  if (process.env.HOTLAP_PAGE_CACHE === '0' || req.method !== 'GET') return false;
  const params = PATHS.find(([p]) => p.test(req.nextUrl.pathname))?.[1];
  if (!params || [...req.nextUrl.searchParams.keys()].some((k) => !params.includes(k))) return false;
  if (!req.headers.get('accept')?.includes('text/html')) return false;
  if (OTHER_ANSWERS.some((h) => req.headers.has(h)) || isCacheRender(req)) return false;
  return !hasSessionCookie(req.cookies.getAll().map((c) => c.name));
}

/**
 * This server's own address (set by `next start` and `next dev`), never the Host header a visitor
 * sent: a render asked of a visitor-named host would carry the render secret there. Unknown → no
 * page cache (every request renders).
 */
function ownOrigin(): string | null {
  return process.env.__NEXT_PRIVATE_ORIGIN || null;
}

interface Rendered extends Kept {
  status: number;
  entry: KeptEntry | null;
}

async function render(key: string, version: number, origin: string): Promise<Rendered> {
  const res = await fetch(origin + key, { headers: { [RENDER_HEADER]: SECRET, accept: 'text/html' }, redirect: 'manual', signal: AbortSignal.timeout(RENDER_TIMEOUT_MS) });
  const html = await res.text();
  const nonce = res.headers.get('content-security-policy')?.match(/'nonce-([A-Za-z0-9+/=]+)'/)?.[1] ?? '';
  const keep = res.status === 200 && !!nonce && !!res.headers.get('content-type')?.startsWith('text/html') && !res.headers.has('set-cookie');
  // An answer that is not kept (a 404, a redirect) is sent once as rendered, its cookies included.
  const headers = [...res.headers].filter(([k]) => !NOT_COPIED.has(k.toLowerCase()) || (!keep && k.toLowerCase() === 'set-cookie'));
  const entry = keep ? keepEntry(key, { version, kind: 'page', status: 200, body: html, nonce, etag: null, app: headers }) : null;
  return { version, html, nonce, headers, status: res.status, entry };
}

/**
 * The page for this request with `nonce` in place of the one it was rendered with, from the cache
 * or rendered once for everyone asking at the same time; null when the counter cannot be trusted
 * or the render for the cache failed (the caller then lets the request through to a normal render).
 */
export async function keptPage(req: PageRequest & { url: string }, nonce: string): Promise<Response | null> {
  const origin = ownOrigin();
  if (origin === null) return null;
  const version = await standingsVersion();
  if (version === null) return null;
  const key = req.nextUrl.pathname + req.nextUrl.search;
  const hit = keptFor(key, version, 'page');
  let page: Kept & { status?: number; entry?: KeptEntry | null };
  let state = 'HIT';
  if (hit) {
    page = { version, html: hit.body, nonce: hit.nonce ?? '', headers: hit.app as [string, string][], entry: hit };
  } else {
    const flight = `${version}:${key}`;
    let p = rendering.get(flight);
    if (!p) {
      p = render(key, version, origin).finally(() => rendering.delete(flight));
      rendering.set(flight, p);
    }
    try {
      page = await p;
    } catch (err) {
      console.warn(`page cache: rendering ${key} for the cache failed (${err instanceof Error ? err.message : err}); rendering for this request`);
      return null;
    }
    state = page.entry ? 'MISS' : 'PASS';
  }
  // The render nonce is in header values too (Link: preloads carry it): replaced there as well.
  const headers = new Headers(page.nonce ? page.headers.map(([k, v]) => [k, v.replaceAll(page.nonce, nonce)]) : page.headers);
  headers.set('X-Page-Cache', state);
  for (const [k, v] of Object.entries(keepMarker(req.headers, page.entry))) headers.set(k, v);
  return new Response(page.nonce ? page.html.replaceAll(page.nonce, nonce) : page.html, { status: page.status ?? 200, headers });
}

/** Forget kept pages (tests and tools that rewrite the database wholesale). */
export function clearKeptPages() {
  clearKept('page');
}
