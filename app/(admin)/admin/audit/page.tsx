import { requirePageRole } from '@/lib/auth/guard';
import { listAudit } from '@/lib/admin';
import { formatDateTime } from '@/lib/format';

export const metadata = { title: 'Audit log' };

export default async function AuditPage() {
  await requirePageRole('/admin/audit', 'admin');
  const events = await listAudit();
  return (
    <div className="space-y-6">
      <h1>Audit log</h1>
      <section className="card overflow-x-auto">
        <table className="table">
          <thead><tr><th>When</th><th>Who</th><th>Action</th><th>Subject</th><th>Details</th></tr></thead>
          <tbody>
            {events.map((e) => (
              <tr key={e.id}>
                <td className="whitespace-nowrap">{formatDateTime(e.createdAt)}</td>
                <td>{e.actor}</td>
                <td className="font-mono text-xs">{e.action}</td>
                <td>{e.subject}</td>
                <td className="font-mono text-xs">{JSON.stringify(e.details)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </div>
  );
}
