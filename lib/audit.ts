import { AuditEvent } from '@/models';
import type { AuditAction } from '@/lib/domain';
import type { Transaction } from 'sequelize';
import { headers } from 'next/headers';
import { clientIp } from '@/lib/http';

/**
 * The address of the request being handled (clientIp: X-Forwarded-For, trusted per TRUST_PROXY),
 * or null outside a request (scripts, the job runner, work after the answer) and when unknown.
 */
async function requestIp(): Promise<string | null> {
  try {
    return clientIp(await headers());
  } catch {
    return null; // headers() throws outside a request scope
  }
}

/**
 * Appends one audit event. The client address is the caller's `ip` when given, else read from the
 * request being handled, so every event written while answering a request records where it came from.
 */
export async function audit(
  action: AuditAction,
  subject: { type: string; id: string | number },
  opts: { actorId?: number | null; details?: Record<string, unknown>; ip?: string | null; transaction?: Transaction } = {},
) {
  const ip = opts.ip ?? (await requestIp());
  await AuditEvent.create(
    {
      action,
      subjectType: subject.type,
      subjectId: String(subject.id),
      actorId: opts.actorId ?? null,
      details: opts.details ?? {},
      ip,
    },
    { transaction: opts.transaction },
  );
}
