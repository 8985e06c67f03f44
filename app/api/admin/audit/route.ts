import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { listAudit, parseAuditQuery } from '@/lib/admin';

/** GET /api/admin/audit?action=&actor=&from=&to=&page=&per_page= — one page of the audit log, newest first. */
export const GET = route(async (req) => {
  await requireRole('admin');
  const q = parseAuditQuery(new URL(req.url).searchParams);
  return Response.json(await listAudit(q));
});
