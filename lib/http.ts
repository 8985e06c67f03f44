/**
 * Helpers that keep route handlers thin: parse with a zod schema, map domain errors to a typed JSON
 * response with the right status.
 */
import { z, ZodError, type ZodType } from 'zod';
import { HttpError } from '@/lib/errors';

export interface ErrorBody {
  error: string;
  fields?: Record<string, string>;
  code?: string;
}

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

/** Reads a JSON body (or form body) and validates it. Malformed JSON is a 400, not a crash. */
export async function readBody<S extends ZodType>(req: Request, schema: S): Promise<z.infer<S>> {
  const type = req.headers.get('content-type') ?? '';
  let data: unknown;
  try {
    if (type.includes('application/json')) data = await req.json();
    else if (type.includes('form')) data = Object.fromEntries((await req.formData()).entries());
    else data = await req.json();
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
    return Response.json(body, { status: err.status });
  }
  console.error(err);
  return Response.json({ error: 'Something went wrong on our side; nothing was changed.' }, { status: 500 });
}

type Handler<C> = (req: Request, ctx: C) => Promise<Response>;

/** Wraps a route handler so thrown HttpErrors become JSON responses with their status. */
export function route<C = unknown>(fn: Handler<C>): Handler<C> {
  return async (req, ctx) => {
    try {
      return await fn(req, ctx);
    } catch (err) {
      return errorResponse(err);
    }
  };
}

/**
 * The client's address, from X-Forwarded-For / X-Real-IP — trusted only when TRUST_PROXY=1 says a
 * reverse proxy in front of the app sets them (anyone can send these headers otherwise).
 * Null when unknown: route handlers in the App Router do not see the socket address.
 */
export function clientIp(headers: Headers | Record<string, string | string[] | undefined>): string | null {
  if (process.env.TRUST_PROXY !== '1') return null;
  const get = (k: string) => (headers instanceof Headers ? headers.get(k) : (headers[k] as string | undefined));
  const fwd = get('x-forwarded-for');
  if (fwd) return String(fwd).split(',')[0].trim().slice(0, 64);
  return get('x-real-ip')?.slice(0, 64) ?? null;
}
