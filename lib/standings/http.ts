/**
 * Conditional GET for the public API: a strong ETag over the exact bytes sent, 304 when the
 * client's If-None-Match holds it (RFC 9110 §8.8.3 and §13.1.2), and Cache-Control per resource.
 * `versionedResponse` keeps each built answer in process under the database's standings change
 * counter, so a repeated or revalidating request is answered without building the body again.
 */
import crypto from 'node:crypto';
import { standingsVersion } from './query';

export interface CachePolicy {
  /** Seconds a browser or shared cache may reuse the answer without asking again. */
  maxAgeS: number;
}

/** Frozen standings never change; live ones change with each judge's decision. */
export const CACHE_LIVE: CachePolicy = { maxAgeS: 30 };
export const CACHE_FROZEN: CachePolicy = { maxAgeS: 3600 };

export function etagOf(body: string): string {
  return `"${crypto.createHash('sha1').update(body).digest('base64url')}"`;
}

/** True when an If-None-Match header names this ETag (weak comparison, "*" matches any). */
export function matchesEtag(header: string | null, etag: string): boolean {
  if (!header) return false;
  const bare = etag.replace(/^W\//, '');
  return header.split(',').some((t) => {
    const v = t.trim();
    return v === '*' || v.replace(/^W\//, '') === bare;
  });
}

export function cachedResponse(req: Request, body: string, contentType: string, policy: CachePolicy, extra: Record<string, string> = {}, etag = etagOf(body)): Response {
  const headers: Record<string, string> = {
    ETag: etag,
    'Cache-Control': `public, max-age=${policy.maxAgeS}, stale-while-revalidate=${policy.maxAgeS}`,
    Vary: 'Accept-Encoding',
    ...extra,
  };
  if (matchesEtag(req.headers.get('if-none-match'), etag)) return new Response(null, { status: 304, headers });
  return new Response(body, { status: 200, headers: { ...headers, 'Content-Type': contentType } });
}

export const cachedJson = (req: Request, data: unknown, policy: CachePolicy, extra?: Record<string, string>) =>
  cachedResponse(req, JSON.stringify(data), 'application/json; charset=utf-8', policy, extra);

/** One built public answer: the bytes and everything needed to send them again. */
export interface BuiltAnswer {
  body: string;
  contentType: string;
  policy: CachePolicy;
  extra?: Record<string, string>;
}

export const jsonAnswer = (data: unknown, policy: CachePolicy, extra?: Record<string, string>): BuiltAnswer => ({
  body: JSON.stringify(data),
  contentType: 'application/json; charset=utf-8',
  policy,
  extra,
});

interface Kept extends BuiltAnswer {
  version: number;
  etag: string;
}

/** Built answers by path and query, least recently used first; bounded by count and by bytes (a full CSV is large). */
const kept = new Map<string, Kept>();
const KEPT_MAX = 256;
const KEPT_MAX_CHARS = 24 * 1024 * 1024;
let keptChars = 0;

function forget(key: string) {
  const k = kept.get(key);
  if (!k) return;
  keptChars -= k.body.length;
  kept.delete(key);
}

/**
 * Answers a public GET from the answer built for the same path and query while `standings_version`
 * held the same value, or builds it (`build`) and keeps it. The counter is read before building, so
 * a kept body is never older than its version; any write that can change a public answer bumps the
 * counter in the database (triggers), so the very next request on any web server builds afresh.
 * Errors thrown by `build` (404, 400) are not kept. X-Cache says whether the body was reused.
 */
export async function versionedResponse(req: Request, build: () => Promise<BuiltAnswer>): Promise<Response> {
  const url = new URL(req.url);
  const key = url.pathname + url.search;
  const version = await standingsVersion();
  const hit = version === null ? undefined : kept.get(key);
  if (hit && hit.version === version) {
    kept.delete(key);
    kept.set(key, hit); // most recently used last
    return cachedResponse(req, hit.body, hit.contentType, hit.policy, { ...hit.extra, 'X-Cache': 'HIT' }, hit.etag);
  }
  const answer = await build();
  const etag = etagOf(answer.body);
  if (version !== null && answer.body.length <= KEPT_MAX_CHARS / 4) {
    forget(key);
    kept.set(key, { ...answer, version, etag });
    keptChars += answer.body.length;
    while (kept.size > KEPT_MAX || keptChars > KEPT_MAX_CHARS) forget(kept.keys().next().value as string);
  }
  return cachedResponse(req, answer.body, answer.contentType, answer.policy, { ...answer.extra, 'X-Cache': 'MISS' }, etag);
}

/** Forget kept answers (tests and tools that rewrite the database wholesale). */
export function clearPublicAnswers() {
  kept.clear();
  keptChars = 0;
}
