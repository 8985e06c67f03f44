/** Read models for the admin screens. */
import { AuditEvent, SentMail, User } from '@/models';
import { Op } from 'sequelize';

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

export async function listAudit(limit = 200) {
  const rows = await AuditEvent.findAll({
    order: [['id', 'DESC']],
    limit,
    include: [{ model: User, as: 'actor', attributes: ['id', 'name', 'email'] }],
  });
  return rows.map((r) => {
    const actor = (r as unknown as { actor?: User }).actor;
    return {
      id: r.id,
      action: r.action,
      subject: `${r.subjectType} ${r.subjectId}`,
      details: r.details,
      actor: actor ? `${actor.name} <${actor.email}>` : 'system',
      ip: r.ip,
      createdAt: r.createdAt.toISOString(),
    };
  });
}

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
