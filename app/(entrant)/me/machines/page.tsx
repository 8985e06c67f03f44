import Link from 'next/link';
import { requirePageRole } from '@/lib/auth/guard';
import { listMachines } from '@/lib/machines';
import { MOTION_SYSTEM_LABELS } from '@/lib/domain';
import { MachineForm } from '@/components/entrant/MachineForm';

export const metadata = { title: 'Machines' };

export default async function MachinesPage() {
  const user = await requirePageRole('/me/machines', 'entrant');
  const machines = await listMachines(user.id);
  return (
    <div className="space-y-8">
      <h1>Machines</h1>
      <section className="card overflow-x-auto">
        {machines.length === 0 ? <p>No machines yet: register one below.</p> : (
          <table className="table" data-testid="machines">
            <thead><tr><th>Name</th><th>Motion</th><th>Build volume</th><th>Nozzle</th><th>Status</th></tr></thead>
            <tbody>
              {machines.map((m) => (
                <tr key={m.id}>
                  <td><Link href={`/me/machines/${m.id}`}>{m.name}</Link></td>
                  <td>{MOTION_SYSTEM_LABELS[m.motionSystem]}</td>
                  <td className="num">{m.buildXMm} × {m.buildYMm} × {m.buildZMm} mm</td>
                  <td className="num">{m.nozzleMm} mm</td>
                  <td>{m.retiredAt ? 'retired' : 'in service'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
      <section className="card">
        <h2 className="mb-4">Register a machine</h2>
        <MachineForm />
      </section>
    </div>
  );
}
