/**
 * Every API route, its methods, and who may call each: the one list that proxy.ts uses to answer
 * unsupported methods with 405 + Allow, and that tests/security walks to probe every route × role.
 * A route file under app/api without an entry here fails that test.
 *
 * Access: 'public' (anyone), 'member' (any signed-in account), or the role the caller needs
 * (roles are additive: every account is an entrant; judge, organizer, admin are granted on top).
 * 'owned' marks routes whose objects are private to someone (others get 404, never the object).
 */
import type { Role } from '@/lib/domain';

export type Access = 'public' | 'member' | Role;
export type ApiMethod = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
export interface ApiRoute {
  /** The file-system pattern under app/api, e.g. `/api/entries/[id]`. */
  path: string;
  methods: Partial<Record<ApiMethod, Access>>;
}

export const API_ROUTES: ApiRoute[] = [
  { path: '/api/account/password-reset', methods: { POST: 'public' } },
  { path: '/api/account/password-reset/confirm', methods: { POST: 'public' } },
  { path: '/api/account/sessions', methods: { DELETE: 'member' } },
  { path: '/api/account/signup', methods: { POST: 'public' } },
  { path: '/api/account/verify', methods: { POST: 'public' } },
  { path: '/api/account/verify/resend', methods: { POST: 'public' } },
  { path: '/api/admin/audit', methods: { GET: 'admin' } },
  { path: '/api/admin/outbox', methods: { GET: 'admin' } },
  { path: '/api/admin/users', methods: { GET: 'admin' } },
  { path: '/api/admin/users/[id]/roles', methods: { PUT: 'admin' } },
  { path: '/api/auth/[...nextauth]', methods: { GET: 'public', POST: 'public' } },
  { path: '/api/entrant/entry-options', methods: { GET: 'entrant' } },
  { path: '/api/entrant/machines', methods: { GET: 'entrant', POST: 'entrant' } },
  { path: '/api/entrant/machines/[id]', methods: { GET: 'entrant', PUT: 'entrant', PATCH: 'entrant' } },
  { path: '/api/entrant/machines/[id]/extrusion-tests', methods: { GET: 'entrant', POST: 'entrant' } },
  { path: '/api/entries', methods: { GET: 'entrant', POST: 'entrant' } },
  { path: '/api/entries/[id]', methods: { GET: 'entrant', PUT: 'entrant' } },
  { path: '/api/entries/[id]/files', methods: { POST: 'entrant' } },
  { path: '/api/entries/[id]/inspect', methods: { POST: 'entrant' } },
  { path: '/api/entries/[id]/inspection', methods: { GET: 'entrant' } },
  { path: '/api/entries/[id]/submit', methods: { POST: 'entrant' } },
  { path: '/api/entries/[id]/withdraw', methods: { POST: 'entrant' } },
  // Public route, private objects: whoever may not read a file gets 404 (lib/entries/files canReadFile).
  { path: '/api/files/[id]', methods: { GET: 'public' } },
  { path: '/api/judging/entries/[id]', methods: { GET: 'judge' } },
  { path: '/api/judging/entries/[id]/decisions', methods: { POST: 'judge' } },
  { path: '/api/judging/entries/[id]/evidence', methods: { GET: 'judge' } },
  { path: '/api/judging/entries/[id]/files/[fileId]', methods: { GET: 'judge' } },
  { path: '/api/judging/entries/[id]/preview', methods: { GET: 'judge' } },
  { path: '/api/judging/queue', methods: { GET: 'judge' } },
  { path: '/api/me', methods: { GET: 'member' } },
  { path: '/api/organizer/seasons', methods: { GET: 'organizer', POST: 'organizer' } },
  { path: '/api/organizer/seasons/[id]', methods: { GET: 'organizer', PUT: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/classes', methods: { POST: 'organizer', PUT: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/classes/[classId]', methods: { PUT: 'organizer', DELETE: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/invitations', methods: { POST: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/invitations/[invitationId]', methods: { DELETE: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/judges', methods: { GET: 'organizer', POST: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/judges/[userId]', methods: { DELETE: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/reinspect', methods: { POST: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/rules', methods: { GET: 'organizer', PUT: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/test-piece', methods: { POST: 'organizer' } },
  { path: '/api/organizer/seasons/[id]/transition', methods: { POST: 'organizer' } },
  { path: '/api/v1/entries/[id]', methods: { GET: 'public' } },
  { path: '/api/v1/entries/[id]/photos/[file]', methods: { GET: 'public' } },
  { path: '/api/v1/seasons', methods: { GET: 'public' } },
  { path: '/api/v1/seasons/[season]', methods: { GET: 'public' } },
  { path: '/api/v1/seasons/[season]/classes/[class]/entrants/[entrant]/entries', methods: { GET: 'public' } },
  { path: '/api/v1/seasons/[season]/classes/[class]/standings', methods: { GET: 'public' } },
];

const segmentRe = (seg: string) => (seg.startsWith('[...') ? '.+' : seg.startsWith('[') ? '[^/]+' : seg.replace(/[.*+?^${}()|\\]/g, '\\$&'));
const compiled = API_ROUTES.map((r) => ({ route: r, re: new RegExp(`^${r.path.split('/').map(segmentRe).join('/')}/?$`) }));

/** The route a request path falls under (static segments win over parameters). */
export function matchApiRoute(pathname: string): ApiRoute | null {
  const params = (r: ApiRoute) => r.path.split('[').length;
  const hits = compiled.filter((c) => c.re.test(pathname)).map((c) => c.route);
  hits.sort((a, b) => params(a) - params(b));
  return hits[0] ?? null;
}

/** The Allow header for a route: its methods, plus HEAD with GET and OPTIONS (Next.js answers both). */
export function allowHeader(r: ApiRoute): string {
  const m = new Set<string>(Object.keys(r.methods));
  if (m.has('GET')) m.add('HEAD');
  m.add('OPTIONS');
  return [...m].sort().join(', ');
}
