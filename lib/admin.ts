/** Read models for the admin screens. */
import 'server-only';
import { AuditEvent, Machine, Season, SentMail, User } from '@/models';
import { col, fn, Op, where as sqlWhere, type WhereOptions } from 'sequelize';
import { z } from 'zod';
import { AUDIT_ACTIONS } from '@/lib/domain';
import { badRequest } from '@/lib/errors';
import { AUDIT_PER_PAGE, auditActionLabel, auditDetailPairs, auditSentence } from '@/lib/auditText';

export async function listUsers() {
  const users = await User.findAll({ order: [['createdAt', 'ASC']] });
  return users.map((u) => ({
    id: u.id,
    name: u.name,
    email: u.email,
    roles: u.roles,
    emailVerified: !!u.emailVerifiedAt,
    createdAt: u.createdAt.toISOString(),
  }));
}

/** The audit log's filters and page, as the API and the page take them (all optional). */
export const AuditQuerySchema = z
  .object({
    action: z.enum(AUDIT_ACTIONS, { error: () => 'action must be one of the listed actions.' }).optional(),
    actor: z.string().trim().max(120, { message: 'actor is at most 120 characters (a name or e-mail, or "system").' }).optional(),
    from: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { message: 'from must be a date like 2026-12-01.' }).optional(),
    to: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { message: 'to must be a date like 2026-12-31.' }).optional(),
    page: z.coerce.number().int().min(1, { message: 'page must be a whole number from 1.' }).max(100_000).optional(),
    per_page: z.coerce.number().int().refine((n) => (AUDIT_PER_PAGE as readonly number[]).includes(n), { message: `per_page must be one of ${AUDIT_PER_PAGE.join(', ')}.` }).optional(),
  })
  .strict()
  .refine((q) => !q.from || !q.to || q.from <= q.to, { message: 'The end date is before the start date: swap them.', path: ['to'] });
export type AuditQuery = z.infer<typeof AuditQuerySchema>;

/** Midnight UTC of a YYYY-MM-DD day; null for a day the calendar lacks (Date rolls 02-30 over to March). */
const dayStart = (d: string) => {
  const t = new Date(`${d}T00:00:00.000Z`);
  return Number.isNaN(t.getTime()) || t.toISOString().slice(0, 10) !== d ? null : t;
};

/**
 * One page of the audit log, newest first, filtered by action, actor (name or e-mail contains, or
 * "system" for events without one) and UTC days (to is inclusive). Each event comes with its label,
 * its sentence and its details as readable pairs.
 */
export async function listAudit(q: AuditQuery = {}) {
  const perPage = q.per_page ?? 50;
  const where: WhereOptions = {};
  const and: WhereOptions[] = [];
  if (q.action) and.push({ action: q.action });
  if (q.actor) {
    if (q.actor.toLowerCase() === 'system') and.push({ actorId: null });
    else {
      const needle = `%${q.actor.toLowerCase()}%`;
      const users = await User.findAll({
        attributes: ['id'],
        where: { [Op.or]: [sqlWhere(fn('lower', col('name')), { [Op.like]: needle }), sqlWhere(fn('lower', col('email')), { [Op.like]: needle })] },
        limit: 1000,
      });
      and.push({ actorId: { [Op.in]: users.map((u) => u.id) } });
    }
  }
  const from = q.from ? dayStart(q.from) : null;
  const to = q.to ? dayStart(q.to) : null;
  if (q.from && !from) throw badRequest('from is not a real date.', { from: 'Not a real date.' });
  if (q.to && !to) throw badRequest('to is not a real date.', { to: 'Not a real date.' });
  if (from) and.push({ createdAt: { [Op.gte]: from } });
  if (to) and.push({ createdAt: { [Op.lt]: new Date(to.getTime() + 86_400_000) } });
  if (and.length) Object.assign(where, { [Op.and]: and });
  const total = await AuditEvent.count({ where });
  const pages = Math.max(1, Math.ceil(total / perPage));
  const page = q.page ?? 1;
  const rows = await AuditEvent.findAll({
    where,
    order: [['id', 'DESC']],
    limit: perPage,
    offset: (page - 1) * perPage,
    include: [{ model: User, as: 'actor', attributes: ['id', 'name', 'email'] }],
  });
  // Names for the sentences: users named in subjects and details, seasons and machines by subject.
  const ids = (type: string) => rows.filter((r) => r.subjectType === type).map((r) => Number(r.subjectId)).filter(Number.isSafeInteger);
  const userIds = [...ids('user'), ...rows.map((r) => Number((r.details as { userId?: unknown })?.userId)).filter(Number.isSafeInteger)];
  const [users, seasons, machines] = await Promise.all([
    userIds.length ? User.findAll({ attributes: ['id', 'name'], where: { id: { [Op.in]: userIds } } }) : [],
    ids('season').length ? Season.findAll({ attributes: ['id', 'name'], where: { id: { [Op.in]: ids('season') } } }) : [],
    ids('machine').length ? Machine.findAll({ attributes: ['id', 'name'], where: { id: { [Op.in]: ids('machine') } } }) : [],
  ]);
  const names = {
    users: new Map(users.map((u) => [u.id, u.name])),
    seasons: new Map(seasons.map((s) => [s.id, s.name])),
    machines: new Map(machines.map((m) => [m.id, m.name])),
  };
  const events = rows.map((r) => {
    const actor = (r as unknown as { actor?: User }).actor;
    const details = (r.details ?? {}) as Record<string, unknown>;
    return {
      id: r.id,
      action: r.action,
      label: auditActionLabel(r.action),
      sentence: auditSentence({ action: r.action, subjectType: r.subjectType, subjectId: r.subjectId, details }, { ...names, actor: actor?.name ?? null }),
      subject: `${r.subjectType} ${r.subjectId}`,
      details,
      detailPairs: auditDetailPairs(details),
      actor: actor ? `${actor.name} <${actor.email}>` : 'system',
      ip: r.ip,
      createdAt: r.createdAt.toISOString(),
    };
  });
  return { events, total, page, per_page: perPage, pages };
}
export type AuditLogPage = Awaited<ReturnType<typeof listAudit>>;

export async function listOutbox(opts: { to?: string; limit?: number } = {}) {
  const rows = await SentMail.findAll({
    where: opts.to ? { to: { [Op.eq]: opts.to.toLowerCase() } } : {},
    order: [['id', 'DESC']],
    limit: opts.limit ?? 100,
  });
  return rows.map((m) => ({
    id: m.id, to: m.to, subject: m.subject, text: m.text as string | null, html: m.html as string | null, transport: m.transport, createdAt: m.createdAt.toISOString(),
    status: m.status, attempts: m.attempts, lastError: m.lastError, sentAt: m.sentAt?.toISOString() ?? null, nextAttemptAt: m.nextAttemptAt?.toISOString() ?? null,
  }));
}

/** Reads the audit log's URL parameters (the first value of each), or a 400 naming the first bad one. */
export function parseAuditQuery(params: URLSearchParams | Record<string, string | string[] | undefined>): AuditQuery {
  const raw: Record<string, string> = {};
  const entries = params instanceof URLSearchParams ? [...params.entries()] : Object.entries(params).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v] as const);
  for (const [k, v] of entries) if (v !== undefined && v !== '' && !(k in raw)) raw[k] = v;
  const r = AuditQuerySchema.safeParse(raw);
  if (r.success) return r.data;
  const fields: Record<string, string> = {};
  for (const issue of r.error.issues) {
    const key = issue.path.join('.') || String((issue as { keys?: string[] }).keys?.[0] ?? '_');
    fields[key] ??= issue.code === 'unrecognized_keys' ? `Unknown parameter; use action, actor, from, to, page, per_page.` : issue.message;
  }
  throw badRequest(Object.values(fields)[0], fields);
}
