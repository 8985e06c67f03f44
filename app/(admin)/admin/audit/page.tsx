import { requirePageRole } from '@/lib/auth/guard';
import { listAudit, parseAuditQuery, type AuditQuery } from '@/lib/admin';
import { HttpError } from '@/lib/errors';
import { AuditTable } from '@/components/admin/AuditTable';
import { Providers } from '@/components/Providers';

export const metadata = { title: 'Audit log' };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

export default async function AuditPage({ searchParams }: Props) {
  await requirePageRole('/admin/audit', 'admin');
  let q: AuditQuery = {};
  let queryError: string | null = null;
  try {
    q = parseAuditQuery(await searchParams);
  } catch (err) {
    if (!(err instanceof HttpError)) throw err;
    queryError = err.message;
  }
  const initial = await listAudit(q);
  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <h1>Audit log</h1>
        <p className="text-sm text-ink-600">
          Who did what, newest first. Times in UTC; the address is the client’s as the trusted proxy reported it (empty when the app runs without one).
        </p>
      </header>
      {queryError && <p role="alert" className="field-error">{queryError} Showing the whole log.</p>}
      <Providers>
        <AuditTable initial={initial} />
      </Providers>
    </div>
  );
}
