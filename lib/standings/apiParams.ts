/** Endpoints that take no query parameters refuse any, so a typo is not silently ignored. */
import { badRequest } from '@/lib/errors';

export function rejectQuery(req: Request): void {
  const keys = [...new URL(req.url).searchParams.keys()];
  if (keys.length) throw badRequest(`This endpoint takes no query parameters; remove "${keys[0]}".`, Object.fromEntries(keys.map((k) => [k, 'Unknown parameter.'])));
}
