import { AuditEvent } from '@/models';
import type { AuditAction } from '@/lib/domain';
import type { Transaction } from 'sequelize';

export async function audit(
  action: AuditAction,
  subject: { type: string; id: string | number },
  opts: { actorId?: number | null; details?: Record<string, unknown>; ip?: string | null; transaction?: Transaction } = {},
) {
  await AuditEvent.create(
    {
      action,
      subjectType: subject.type,
      subjectId: String(subject.id),
      actorId: opts.actorId ?? null,
      details: opts.details ?? {},
      ip: opts.ip ?? null,
    },
    { transaction: opts.transaction },
  );
}
