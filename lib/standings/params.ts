/**
 * The standings query as data: one zod schema shared by the API route, the standings page and the
 * table's URL. Every parameter is checked; a bad one answers 400 with a sentence naming it.
 */
import { z } from 'zod';
import { MATERIAL_FAMILIES } from '@/lib/inspection/materials';
import { MOTION_SYSTEMS } from '@/lib/domain';
import { badRequest } from '@/lib/errors';

/** Sortable columns: API name → what it sorts by. A leading "-" sorts descending. */
export const SORT_KEYS = ['rank', 'time', 'peak_flow', 'p95_flow', 'layer_height', 'date', 'entrant', 'machine', 'nozzle'] as const;
export type SortKey = (typeof SORT_KEYS)[number];

export const PER_PAGE_MAX = 100;
export const PER_PAGE_DEFAULT = 25;
export const PER_PAGE_CHOICES = [10, 25, 50, 100] as const;
export const Q_MAX_LENGTH = 80;
const PAGE_MAX = 100_000;

export interface StandingsQuery {
  page: number;
  perPage: number;
  sort: SortKey;
  desc: boolean;
  material?: (typeof MATERIAL_FAMILIES)[number];
  motion?: (typeof MOTION_SYSTEMS)[number];
  q?: string;
  format: 'json' | 'csv';
  /** True when page or per_page was given: CSV then exports that page only, else the whole view. */
  paged: boolean;
}

export const DEFAULT_QUERY: StandingsQuery = { page: 1, perPage: PER_PAGE_DEFAULT, sort: 'rank', desc: false, format: 'json', paged: false };

const wholeNumber = (name: string, min: number, max: number) =>
  z
    .string()
    .regex(/^\d{1,7}$/, { message: `${name} must be a whole number from ${min} to ${max}.` })
    .transform(Number)
    .refine((n) => n >= min && n <= max, { message: `${name} must be a whole number from ${min} to ${max}.` });

const SORT_VALUES = SORT_KEYS.flatMap((k) => [k, `-${k}`]) as [string, ...string[]];

export const StandingsParamsSchema = z
  .object({
    page: wholeNumber('page', 1, PAGE_MAX).optional(),
    per_page: wholeNumber('per_page', 1, PER_PAGE_MAX).optional(),
    sort: z.enum(SORT_VALUES, { error: () => `sort must be one of: ${SORT_KEYS.join(', ')} (prefix "-" for descending).` }).optional(),
    material: z.enum(MATERIAL_FAMILIES, { error: () => `material must be one of: ${MATERIAL_FAMILIES.join(', ')}.` }).optional(),
    motion: z.enum(MOTION_SYSTEMS, { error: () => `motion must be one of: ${MOTION_SYSTEMS.join(', ')}.` }).optional(),
    q: z
      .string()
      .max(Q_MAX_LENGTH, { message: `q (machine name search) is at most ${Q_MAX_LENGTH} characters.` })
      .refine((s) => !/[\u0000-\u001f]/.test(s), { message: 'q must not contain control characters.' })
      .optional(),
    format: z.enum(['json', 'csv'], { error: () => 'format must be "json" or "csv".' }).optional(),
  })
  .strict();

const KNOWN = Object.keys(StandingsParamsSchema.shape);

/** Parses URL search parameters into a StandingsQuery or throws a 400 HttpError naming the parameter. */
export function parseStandingsQuery(params: URLSearchParams | Record<string, string | string[] | undefined>): StandingsQuery {
  const raw: Record<string, string> = {};
  const fields: Record<string, string> = {};
  const entries: [string, string][] =
    params instanceof URLSearchParams
      ? [...params.entries()]
      : Object.entries(params).flatMap(([k, v]) => (v === undefined ? [] : Array.isArray(v) ? v.map((x) => [k, x] as [string, string]) : [[k, v] as [string, string]]));
  for (const [k, v] of entries) {
    if (!KNOWN.includes(k)) fields[k] = `Unknown parameter "${k}"; use ${KNOWN.join(', ')}.`;
    else if (k in raw) fields[k] = `${k} is given more than once; give it once.`;
    else raw[k] = v;
  }
  if (Object.keys(fields).length) throw badRequest(Object.values(fields)[0], fields);
  const result = StandingsParamsSchema.safeParse(raw);
  if (!result.success) {
    for (const issue of result.error.issues) {
      const key = issue.path.join('.') || '_';
      if (!(key in fields)) fields[key] = issue.message;
    }
    throw badRequest(Object.values(fields)[0], fields);
  }
  const p = result.data;
  const sort = p.sort ?? 'rank';
  const q = p.q?.trim();
  return {
    page: p.page ?? 1,
    perPage: p.per_page ?? PER_PAGE_DEFAULT,
    sort: sort.replace(/^-/, '') as SortKey,
    desc: sort.startsWith('-'),
    material: p.material,
    motion: p.motion,
    q: q ? q : undefined,
    format: p.format ?? 'json',
    paged: p.page !== undefined || p.per_page !== undefined,
  };
}

/** The URL parameters of a query, leaving out defaults, so equal views have equal links. */
export function standingsSearchParams(q: Partial<StandingsQuery>, opts: { format?: 'csv'; withPaging?: boolean } = {}): URLSearchParams {
  const out = new URLSearchParams();
  const withPaging = opts.withPaging ?? true;
  if (withPaging && q.page && q.page !== 1) out.set('page', String(q.page));
  if (withPaging && q.perPage && q.perPage !== PER_PAGE_DEFAULT) out.set('per_page', String(q.perPage));
  if (q.sort && (q.sort !== 'rank' || q.desc)) out.set('sort', `${q.desc ? '-' : ''}${q.sort}`);
  if (q.material) out.set('material', q.material);
  if (q.motion) out.set('motion', q.motion);
  if (q.q) out.set('q', q.q);
  if (opts.format) out.set('format', opts.format);
  return out;
}
