/**
 * Conditional GET for the public API: a strong ETag over the exact bytes sent, 304 when the
 * client's If-None-Match holds it (RFC 9110 §8.8.3 and §13.1.2), and Cache-Control per resource.
 */
import crypto from 'node:crypto';

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

export function cachedResponse(req: Request, body: string, contentType: string, policy: CachePolicy, extra: Record<string, string> = {}): Response {
  const etag = etagOf(body);
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
