import { notFound } from 'next/navigation';
import { parseId } from '@/lib/ids';
import { requirePageRole } from '@/lib/auth/guard';
import { extrusionTestsOf, machineJson } from '@/lib/machines';
import { Machine } from '@/models';
import { MOTION_SYSTEM_LABELS } from '@/lib/domain';
import { MachineForm, RetireButton } from '@/components/entrant/MachineForm';
import { ExtrusionTestForm, ExtrusionTestResult } from '@/components/entrant/ExtrusionTestForm';

export const metadata = { title: 'Machine' };

export default async function MachinePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const user = await requirePageRole(`/me/machines/${id}`, 'entrant');
  const machineId = parseId(id);
  const row = machineId !== null ? await Machine.findOne({ where: { id: machineId, ownerId: user.id } }) : null;
  if (!row) notFound();
  const machine = machineJson(row);
  const tests = await extrusionTestsOf(machine.id);
  return (
    <div className="space-y-8">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h1>{machine.name}</h1>
          <p className="text-sm text-ink-600">{MOTION_SYSTEM_LABELS[machine.motionSystem]} · {machine.buildXMm} × {machine.buildYMm} × {machine.buildZMm} mm · {machine.nozzleMm} mm nozzle{machine.retiredAt ? ' · retired' : ''}</p>
        </div>
        <RetireButton machine={machine} />
      </div>
      <section className="space-y-4" aria-labelledby="tests-h">
        <h2 id="tests-h">Extrusion-limit tests</h2>
        <p className="max-w-3xl text-sm text-ink-600">
          Feed the same length of filament at rising rates, weigh each extruded sample and compare it with an unextruded piece of that length.
          The limit is the last rate whose efficiency stays at or above the threshold; entries on this machine are checked against the latest limit for their material.
        </p>
        {tests.length === 0 ? <p className="text-sm">No tests recorded yet.</p> : tests.map((t) => <ExtrusionTestResult key={t.id} test={t} />)}
        <div className="card">
          <h3 className="mb-4 font-semibold">Record a test</h3>
          <ExtrusionTestForm machineId={machine.id} />
        </div>
      </section>
      <section className="card">
        <h2 className="mb-4">Edit machine</h2>
        <MachineForm machine={machine} />
      </section>
    </div>
  );
}
