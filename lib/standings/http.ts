/**
 * Conditional GET for the public API: a strong ETag over the exact bytes sent, 304 when the
 * client's If-None-Match holds it (RFC 9110 §8.8.3 and §13.1.2), and Cache-Control per resource.
 * `versionedResponse` keeps each built answer in process under the database's standings change
 * counter, so a repeated or revalidating request is answered without building the body again.
 */
import { standingsVersion } from './query';
import { etagOf, keepEntry, keepMarker, keptFor, matchesEtag, clearKept, type KeptEntry } from './keptAnswers';

export { etagOf, matchesEtag };

export interface CachePolicy {
  /** Seconds a browser or shared cache may reuse the answer without asking again. */
  maxAgeS: number;
}

/**
 * Frozen standings never change; live ones change with each judge's decision, so a browser or
 * shared cache must ask again every time (a cheap 304 while the ETag holds): never a stale rank
 * after a verification.
 */
export const CACHE_LIVE: CachePolicy = { maxAgeS: 0 };
export const CACHE_FROZEN: CachePolicy = { maxAgeS: 3600 };

export function cachedResponse(req: Request, body: string, contentType: string, policy: CachePolicy, extra: Record<string, string> = {}, etag = etagOf(body)): Response {
  const headers: Record<string, string> = {
    ETag: etag,
    'Cache-Control': policy.maxAgeS > 0 ? `public, max-age=${policy.maxAgeS}, stale-while-revalidate=${policy.maxAgeS}` : 'public, max-age=0, must-revalidate',
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
  const hit = version === null ? undefined : keptFor(key, version, 'api');
  if (hit) {
    const a = hit.app as BuiltAnswer;
    return cachedResponse(req, a.body, a.contentType, a.policy, { ...a.extra, 'X-Cache': 'HIT', ...keepMarker(req.headers, hit) }, hit.etag!);
  }
  const answer = await build();
  const etag = etagOf(answer.body);
  let entry: KeptEntry | null = null;
  if (version !== null) entry = keepEntry(key, { version, kind: 'api', status: 200, body: answer.body, nonce: null, etag, app: answer });
  return cachedResponse(req, answer.body, answer.contentType, answer.policy, { ...answer.extra, 'X-Cache': 'MISS', ...keepMarker(req.headers, entry) }, etag);
}

/** Forget kept answers (tests and tools that rewrite the database wholesale). */
export function clearPublicAnswers() {
  clearKept('api');
}
