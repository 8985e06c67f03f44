import Link from 'next/link';
import { machineHistory, parseId } from '@/lib/standings/views';
import { loadOr404 } from '@/components/standings/load';
import { HistoryTable } from '@/components/standings/HistoryTable';
import { TimesOverSeasons } from '@/components/standings/charts';
import { MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';

export const metadata = { title: 'Machine' };

export default async function MachinePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const h = await loadOr404((async () => machineHistory(parseId(id, 'machine')))());
  const m = h.machine;
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-ink-600"><Link href="/seasons">Seasons</Link> › Machines</nav>
      <header>
        <h1>{m.name}</h1>
        <p className="text-ink-700">
          {MOTION_SYSTEM_LABELS[m.motion as MotionSystem] ?? m.motion} · build volume <span className="num">{m.build_volume_mm.x} × {m.build_volume_mm.y} × {m.build_volume_mm.z} mm</span> · nozzle <span className="num">{m.nozzle_mm} mm</span> · run by <Link href={`/entrants/${m.owner.id}`}>{m.owner.name}</Link>
        </p>
        <dl className="mt-2 grid gap-x-6 gap-y-1 text-sm text-ink-700 sm:grid-cols-[auto_1fr]">
          {m.hotend && (<><dt className="font-semibold">Hotend</dt><dd>{m.hotend}</dd></>)}
          {m.extruder && (<><dt className="font-semibold">Extruder</dt><dd>{m.extruder}</dd></>)}
          {m.firmware && (<><dt className="font-semibold">Firmware</dt><dd>{m.firmware}</dd></>)}
          {m.modifications && (<><dt className="font-semibold">Modifications</dt><dd>{m.modifications}</dd></>)}
        </dl>
      </header>
      <TimesOverSeasons points={h.best_per_season} />
      <HistoryTable entries={h.entries} show="entrant" />
    </div>
  );
}
