/**
 * Every API route, its methods, and who may call each: the one list that next.config.mjs turns into
 * Allow headers, and that tests/security walks to probe every route × role.
 * A route file under app/api without an entry here fails that test.
 *
 * Access: 'public' (anyone), 'member' (any signed-in account), or the role the caller needs
 * (roles are additive: every account is an entrant; judge, organizer, admin are granted on top).
 * `/api/files/[id]` is public as a route, but its objects are private: whoever may not read a file
 * gets 404 (lib/entries/files canReadFile).
 */
import type { Role } from '@/lib/domain';
import apiRoutes from './apiRoutes.json';

export type Access = 'public' | 'member' | Role;
export type ApiMethod = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
export interface ApiRoute {
  /** The file-system pattern under app/api, e.g. `/api/entries/[id]`. */
  path: string;
  methods: Partial<Record<ApiMethod, Access>>;
}

/**
 * The list itself is JSON (apiRoutes.json) so that next.config.mjs can read it too: it sends each
 * route's Allow header (with Next.js's own 405 for a method a route does not export).
 */
export const API_ROUTES = apiRoutes as ApiRoute[];

/** The Allow header for a route: its methods, plus HEAD with GET and OPTIONS (Next.js answers both). next.config.mjs computes the same. */
export function allowHeader(r: ApiRoute): string {
  const m = new Set<string>(Object.keys(r.methods));
  if (m.has('GET')) m.add('HEAD');
  m.add('OPTIONS');
  return [...m].sort().join(', ');
}
