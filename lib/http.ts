/**
 * Helpers that keep route handlers thin: one wrapper (`route`) that every route handler goes
 * through — origin check, body limits, typed JSON errors — plus zod parsing and the client address.
 */
import { NextRequest } from 'next/server';
import { z, ZodError, type ZodType } from 'zod';
import { HttpError } from '@/lib/errors';
import { trustedProxyHops } from '@/lib/security/headers';

export interface ErrorBody {
  error: string;
  fields?: Record<string, string>;
  code?: string;
}

/** Default limit for request bodies that are read whole (JSON, next-auth's form posts). */
export const JSON_BODY_LIMIT_BYTES = 64 * 1024;

/** For the forms that carry Markdown (season description, rulebook): up to 20 000 characters of text. */
export const TEXT_FORM_BODY_LIMIT_BYTES = 256 * 1024;

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** First message per field path, for showing next to the form field. */
export function fieldErrors(err: ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of err.issues) {
    const key = issue.path.join('.') || '_';
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}

export function parseInput<S extends ZodType>(schema: S, data: unknown): z.infer<S> {
  const result = schema.safeParse(data);
  if (!result.success) throw new HttpError(400, 'Some fields need attention.', fieldErrors(result.error));
  return result.data;
}

const mediaType = (req: Request) => (req.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();

/**
 * Reads a JSON body and validates it. Only `application/json` is accepted: a cross-site HTML form
 * can send text/plain, urlencoded or multipart without asking, but not JSON, so this also closes the
 * form-post route to the JSON API. Malformed JSON is a 400, not a crash.
 */
export async function readBody<S extends ZodType>(req: Request, schema: S): Promise<z.infer<S>> {
  if (mediaType(req) !== 'application/json')
    throw new HttpError(415, 'Send this request as JSON (Content-Type: application/json).', undefined, 'unsupported_media_type');
  let data: unknown;
  try {
    data = await req.json();
  } catch {
    throw new HttpError(400, 'The request body is not valid JSON.');
  }
  return parseInput(schema, data);
}

export function errorResponse(err: unknown): Response {
  if (err instanceof HttpError) {
    const body: ErrorBody = { error: err.message };
    if (err.fields) body.fields = err.fields;
    if (err.code) body.code = err.code;
    const retryAfterS = (err as { retryAfterS?: number }).retryAfterS;
    const headers = retryAfterS ? { 'Retry-After': String(retryAfterS) } : undefined;
    return Response.json(body, { status: err.status, headers });
  }
  console.error(err);
  return Response.json({ error: 'Something went wrong on our side; nothing was changed.' }, { status: 500 });
}

/** The app's own origin (scheme://host:port), from APP_URL / NEXTAUTH_URL. */
export function appOrigin(): string {
  return new URL(process.env.APP_URL || process.env.NEXTAUTH_URL || 'http://localhost:3000').origin;
}

/**
 * Refuses a state-changing request that a browser sent on behalf of another site.
 * - Origin present: it must be the app's own origin (another port of the same host is another origin),
 *   or the host the visitor reached this server under (originMatchesHost).
 * - Origin absent: Sec-Fetch-Site must be `same-origin` or `none` (typed into the address bar).
 * - Both absent: allowed. Browsers send Origin on every cross-origin POST/PUT/PATCH/DELETE and
 *   Sec-Fetch-Site on every request (Fetch standard, "append a request `Origin` header";
 *   W3C Fetch Metadata Request Headers; OWASP CSRF Prevention Cheat Sheet, "Verifying Origin With
 *   Standard Headers" and "Fetch Metadata headers"), so a request with neither comes from a
 *   non-browser client (curl, the tests' HTTP client) that holds its own cookies and cannot be
 *   tricked into riding someone else's session.
 */
/**
 * The page was served by this very server under the name the browser used (e.g. 127.0.0.1 where
 * APP_URL says localhost): the browser sets Host from the URL it requested and a page cannot forge
 * it, so an Origin whose host:port equals Host is this site as the visitor reached it. Another port
 * or another name is another origin and still refused.
 */
function originMatchesHost(origin: string, host: string | null): boolean {
  if (!host) return false;
  try {
    return new URL(origin).host === host.toLowerCase();
  } catch {
    return false;
  }
}

export function checkOrigin(req: Request) {
  if (SAFE_METHODS.has(req.method)) return;
  const origin = req.headers.get('origin');
  const site = req.headers.get('sec-fetch-site');
  const ok = origin !== null ? origin === appOrigin() || originMatchesHost(origin, req.headers.get('host')) : site === null || site === 'same-origin' || site === 'none';
  if (!ok) throw new HttpError(403, 'This request came from another site, so it was refused. Use the form on this site.', undefined, 'cross_origin');
}

const kb = (n: number) => `${Math.round(n / 1024)} KB`;

/**
 * Reads the whole body, refusing with 413 as soon as it passes `limit` bytes. Content-Length is
 * checked first (cheap), but bytes are counted while streaming too: the header can lie or be absent
 * (chunked transfer), and the stream is cancelled at the limit so nothing more is buffered.
 */
export async function readLimited(req: Request, limit: number): Promise<Uint8Array<ArrayBuffer>> {
  const tooLarge = () => new HttpError(413, `The request body is larger than ${kb(limit)}, the most this form accepts. Shorten it and try again.`, undefined, 'body_too_large');
  const declared = Number(req.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > limit) throw tooLarge();
  if (!req.body) return new Uint8Array(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => {});
      throw tooLarge();
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

export interface RouteOptions {
  /** Largest body read whole (JSON, forms); default 64 KB. Multipart uploads stream to their own limits. */
  maxBodyBytes?: number;
}

type Handler<C> = (req: Request, ctx: C) => Promise<Response>;

/**
 * Wraps every route handler: refuses cross-site state changes (checkOrigin), reads non-multipart
 * bodies up to a limit before the handler sees them (413 beyond), and turns thrown HttpErrors into
 * JSON responses with their status. Multipart bodies are left streaming for lib/uploads (formidable,
 * with its own size and count limits); a JSON handler refuses them with 415 without reading.
 */
export function route<C = unknown>(fn: Handler<C>, opts: RouteOptions = {}): Handler<C> {
  return async (req, ctx) => {
    try {
      checkOrigin(req);
      let inner = req;
      if (!SAFE_METHODS.has(req.method) && mediaType(req) !== 'multipart/form-data') {
        const body = await readLimited(req, opts.maxBodyBytes ?? JSON_BODY_LIMIT_BYTES);
        // NextRequest (not Request) so handlers that use nextUrl (next-auth's) keep working.
        inner = new NextRequest(req.url, { method: req.method, headers: req.headers, body: body.byteLength ? body : undefined });
      }
      return await fn(inner, ctx);
    } catch (err) {
      return errorResponse(err);
    }
  };
}

/**
 * The client's address. Route handlers in the App Router do not see the socket, so it comes from
 * X-Forwarded-For, trusted only when TRUST_PROXY=N says N reverse proxies in front of the app each
 * append the address they received. The client can write anything at the LEFT of that header, so
 * the address is the N-th entry from the RIGHT (the one the outermost trusted proxy saw).
 * `TRUST_PROXY=1`: one proxy, the last entry. Null when unknown (no TRUST_PROXY, or too few entries).
 */
export function clientIp(headers: Headers | Record<string, string | string[] | undefined>): string | null {
  const hops = trustedProxyHops();
  if (!hops) return null;
  const get = (k: string) => {
    const v = headers instanceof Headers ? headers.get(k) : headers[k];
    return Array.isArray(v) ? v.join(',') : v;
  };
  const entries = String(get('x-forwarded-for') ?? '')
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
  const ip = entries[entries.length - hops];
  return ip ? ip.slice(0, 64) : null;
}
