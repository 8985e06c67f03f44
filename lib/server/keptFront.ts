/**
 * Kept public answers served at the Node.js HTTP server, ahead of Next.js (installed by
 * lib/server/front.ts from instrumentation.ts).
 *
 * Why ahead of the framework: measured on this project's 2-core machine, an empty Next.js route
 * handler costs 1.3–2.9 ms of CPU per request behind `next start` and a page answered from
 * proxy.ts ~1.4 ms more than a static file (0.5 ms), so no answer that goes through Next.js's
 * pipeline can reach half the static file's rate (README "Performance"). Here a kept answer costs
 * one counter read and one write.
 *
 * What is answered here: GET and HEAD without a body, without a session cookie or Authorization,
 * without the router's RSC/prefetch/action headers, whose exact URL (path + query, byte for byte as
 * sent) Next.js has already answered with an answer kept in the shared store
 * (lib/standings/keptAnswers.ts) — so URL variants Next.js normalizes or redirects are only ever
 * answered the way Next.js answered them — built for the counter's current value (read once per
 * request from the database: a write on any web server sharing it shows on the very next
 * request). The head Next.js sent for that entry is kept with it, so the
 * status and headers are Next.js's own, byte for byte, except Date, the framing (length, gzip) and,
 * on pages, the nonce (a fresh one per answer, in the body, the CSP and the Link header). Pages only
 * for requests that ask for HTML, as in the page cache. Everything else goes to Next.js unchanged.
 * If-None-Match with the kept ETag → 304 without a body; Accept-Encoding with gzip → the gzip copy
 * made once per kept answer (Next.js's `compress` gzips its streamed answers whatever their size,
 * so this does too). HOTLAP_PAGE_CACHE=0 turns it off.
 */
import crypto from 'node:crypto';
import type http from 'node:http';
import { hasSessionCookie } from '@/lib/auth/sessionCookie';
import { contentSecurityPolicy, HSTS_VALUE, isHttpsRequest } from '@/lib/security/headers';
import { readCounter } from '@/lib/standings/version';
import { acceptsGzip, FRONT_HEADER, gzipAnswer, gzipParts, KEEP_MARKER, KEPT_HEADER, keptForUrl, keptStore, markedEntry, matchesEtag, recordWire, OTHER_ANSWERS, RENDER_HEADER, type KeptEntry, type Wire } from '@/lib/standings/keptAnswers';

/** Headers of Next.js's answer that are not part of the kept answer: framing, per-connection, per-answer. */
const FRAMING = new Set(['date', 'connection', 'keep-alive', 'transfer-encoding', 'content-length', 'content-encoding', KEEP_MARKER, KEPT_HEADER]);
const PER_PAGE_ANSWER = new Set(['content-security-policy', 'strict-transport-security']);
const CACHE_HEADERS = new Set(['x-cache', 'x-page-cache']);

/** Whether this request could be answered from a kept answer at all (before looking at the store). */
function plainAnonymousRead(req: http.IncomingMessage): boolean {
  if (req.method !== 'GET' && req.method !== 'HEAD') return false;
  const h = req.headers;
  if (h['content-length'] !== undefined || h['transfer-encoding'] !== undefined || h.authorization !== undefined || h[RENDER_HEADER] !== undefined) return false;
  if (OTHER_ANSWERS.some((n) => h[n] !== undefined) || req.url?.includes('_rsc')) return false;
  const cookie = h.cookie;
  return !cookie || !hasSessionCookie(cookie.split(';').map((c) => c.split('=', 1)[0].trim()));
}

/**
 * Answers `req` from a kept answer, or hands it to Next.js (`next`) recording Next.js's head for
 * the entry the app keeps on the way. Returns true when it took the request (it may still call
 * `next` later, after the counter read).
 */
export function keptAnswerFront(req: http.IncomingMessage, res: http.ServerResponse, next: () => void): boolean {
  if (!plainAnonymousRead(req)) {
    // Only the front layer may ask the app to mark its answer.
    if (req.headers[FRONT_HEADER] !== undefined) delete req.headers[FRONT_HEADER];
    return false;
  }
  const url = req.url ?? '';
  const entry = keptForUrl(url);
  const asksHtml = req.headers.accept?.includes('text/html') ?? false;
  if (!entry?.wire || (entry.kind === 'page' && !asksHtml)) {
    pass(req, res, url, next);
    return true;
  }
  readCounter()
    .then(
      (version) => (version === entry.version && entry.wire ? answer(req, res, entry, entry.wire) : pass(req, res, url, next)),
      () => pass(req, res, url, next),
    )
    .catch((err) => {
      // Never an unhandled rejection (it would end the process): Next.js answers, or the connection closes.
      console.error(`kept answers: ${url}: ${err instanceof Error ? err.message : err}`);
      if (!res.headersSent) pass(req, res, url, next);
      else res.destroy();
    });
  return true;
}

/** To Next.js, recording the head it writes when the app marked the answer as a kept entry's. */
function pass(req: http.IncomingMessage, res: http.ServerResponse, url: string, next: () => void) {
  req.headers[FRONT_HEADER] = keptStore().secret;
  res.setHeader(KEPT_HEADER, 'miss');
  const writeHead = res.writeHead;
  let seen = false;
  res.writeHead = function (this: http.ServerResponse, ...args: unknown[]) {
    if (!seen) {
      seen = true;
      const marker = res.getHeader(KEEP_MARKER);
      if (marker !== undefined) {
        res.removeHeader(KEEP_MARKER);
        record(url, String(marker), typeof args[0] === 'number' ? args[0] : res.statusCode, res);
      }
    }
    return (writeHead as (...a: unknown[]) => http.ServerResponse).apply(this, args);
  } as typeof res.writeHead;
  next();
}

function record(url: string, marker: string, status: number, res: http.ServerResponse) {
  const entry = markedEntry(marker);
  if (!entry || status !== entry.status) return;
  if (entry.wire) {
    recordWire(url, entry, entry.wire);
    return;
  }
  const headers: [string, string][] = [];
  let cacheHeader: string | null = null;
  // A page's answer carries that answer's nonce (proxy.ts put it in place of the render's, in the
  // body and in header values such as Link): kept with the render's again, replaced per answer.
  const answerNonce = entry.nonce ? String(res.getHeader('content-security-policy') ?? '').match(/'nonce-([A-Za-z0-9+/=]+)'/)?.[1] : undefined;
  if (entry.nonce && !answerNonce) return;
  // Names as Next.js wrote them (Node.js ≥ 15.13 keeps their case; the types lag behind).
  const raw = res as unknown as { getRawHeaderNames?(): string[] };
  for (const name of raw.getRawHeaderNames?.() ?? res.getHeaderNames()) {
    const lower = name.toLowerCase();
    const value = res.getHeader(name);
    if (FRAMING.has(lower) || (entry.kind === 'page' && PER_PAGE_ANSWER.has(lower))) continue;
    if (lower === 'set-cookie' || Array.isArray(value) || value === undefined) return; // never kept with cookies
    if (CACHE_HEADERS.has(lower)) {
      cacheHeader = name;
      continue;
    }
    headers.push([name, answerNonce ? String(value).replaceAll(answerNonce, entry.nonce!) : String(value)]);
  }
  const parts = entry.nonce ? entry.body.split(entry.nonce).map((p) => Buffer.from(p)) : [Buffer.from(entry.body)];
  recordWire(url, entry, { headers, cacheHeader, parts, gzip: null });
}

function answer(req: http.IncomingMessage, res: http.ServerResponse, entry: KeptEntry, wire: Wire) {
  const flat: string[] = [];
  const nonce = entry.nonce ? crypto.randomBytes(16).toString('base64') : null;
  const notModified = entry.etag !== null && matchesEtag(req.headers['if-none-match'], entry.etag);
  for (const [k, v] of wire.headers) {
    if (notModified && k.toLowerCase() === 'content-type') continue;
    flat.push(k, nonce && entry.nonce && v.includes(entry.nonce) ? v.replaceAll(entry.nonce, nonce) : v);
  }
  if (wire.cacheHeader) flat.push(wire.cacheHeader, 'HIT');
  flat.push(KEPT_HEADER, 'hit');
  if (nonce) {
    flat.push('Content-Security-Policy', contentSecurityPolicy(nonce));
    const forwarded = req.headers['x-forwarded-proto'];
    if (isHttpsRequest(typeof forwarded === 'string' ? forwarded : null, 'encrypted' in req.socket && req.socket.encrypted ? 'https:' : 'http:')) flat.push('Strict-Transport-Security', HSTS_VALUE);
  }
  if (notModified) {
    res.writeHead(304, flat);
    res.end();
    return;
  }
  const filler = nonce ? Buffer.from(nonce) : null;
  const size = wire.parts.reduce((n, p) => n + p.length, 0) + (filler ? filler.length * (wire.parts.length - 1) : 0);
  let body: Buffer;
  if (acceptsGzip(req.headers['accept-encoding'])) {
    wire.gzip ??= gzipParts(wire.parts);
    body = filler ? gzipAnswer(wire.parts, wire.gzip, filler) : wire.gzip[0];
    flat.push('Content-Encoding', 'gzip');
  } else {
    body = filler ? Buffer.concat(wire.parts.flatMap((p, i) => (i ? [filler, p] : [p]))) : wire.parts[0];
  }
  flat.push('Content-Length', String(body.length));
  res.writeHead(entry.status, flat);
  if (req.method === 'HEAD') res.end();
  else res.end(body);
}
