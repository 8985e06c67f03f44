import Link from 'next/link';
import { machineHistory, parseId } from '@/lib/standings/views';
import { loadOr404 } from '@/components/standings/load';
import { HistoryTable } from '@/components/standings/HistoryTable';
import { LazyTimesOverSeasons as TimesOverSeasons } from '@/components/charts/lazy';
import { MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';
import { publicFlowLimits } from '@/lib/machines';
import { speedCeilingMms } from '@/lib/extrusion';
import { MATERIALS } from '@/lib/inspection/materials';
import { formatDate, formatNumber } from '@/lib/format';

export const metadata = { title: 'Machine' };

export default async function MachinePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const h = await loadOr404((async () => machineHistory(parseId(id, 'machine')))());
  const m = h.machine;
  const flow = await publicFlowLimits(m.id);
  // The speed the tested flow allows for a 0.2 mm layer and a 0.45 mm line, capped by the machine's own limit.
  const ceiling = (limit: number) => {
    const v = speedCeilingMms(limit, 0.2, 0.45);
    return flow.maxSpeedMms !== null && flow.maxSpeedMms < v ? { speed: flow.maxSpeedMms, byMachine: true } : { speed: v, byMachine: false };
  };
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-ink-600"><Link href="/seasons">Seasons</Link> › Machines</nav>
      <header>
        <h1>{m.name}</h1>
        <p className="text-ink-700">
          {MOTION_SYSTEM_LABELS[m.motion as MotionSystem] ?? m.motion} · build volume <span className="num">{m.build_volume_mm.x} × {m.build_volume_mm.y} × {m.build_volume_mm.z} mm</span> · nozzle <span className="num">{m.nozzle_mm} mm</span> · owned by <Link href={`/entrants/${m.owner.id}`}>{m.owner.name}</Link>
        </p>
        <dl className="mt-2 grid gap-x-6 gap-y-1 text-sm text-ink-700 sm:grid-cols-[auto_1fr]">
          {m.hotend && (<><dt className="font-semibold">Hotend</dt><dd>{m.hotend}</dd></>)}
          {m.extruder && (<><dt className="font-semibold">Extruder</dt><dd>{m.extruder}</dd></>)}
          {m.firmware && (<><dt className="font-semibold">Firmware</dt><dd>{m.firmware}</dd></>)}
          {m.modifications && (<><dt className="font-semibold">Modifications</dt><dd>{m.modifications}</dd></>)}
        </dl>
      </header>
      <section className="card space-y-3" aria-labelledby="flow-h" data-testid="machine-flow-limits">
        <h2 id="flow-h">Measured flow limits</h2>
        <p className="text-sm text-ink-600">
          The owner&apos;s latest extrusion-limit test per material (the last rate whose extruded sample kept its mass), and the highest volumetric flow Hotlap measured in this machine&apos;s verified entries.
          {flow.maxSpeedMms !== null && <> Speed limit in the machine&apos;s record: <span className="num">{formatNumber(flow.maxSpeedMms, 0, 'mm/s')}</span>.</>}
          {flow.maxAccelMmS2 !== null && <> Acceleration limit: <span className="num">{formatNumber(flow.maxAccelMmS2, 0, 'mm/s²')}</span>.</>}
        </p>
        {flow.limits.length === 0 ? <p className="text-sm">No extrusion-limit test or inspected entry yet.</p> : (
          <div className="overflow-x-auto">
            <table className="table">
              <thead><tr><th>Material</th><th>Tested limit</th><th>Speed it allows at 0.2 × 0.45 mm</th><th>Verified entries</th><th>Highest flow measured (95th pct · peak)</th></tr></thead>
              <tbody>
                {flow.limits.map((l) => {
                  const c = l.testedLimitMm3s !== null ? ceiling(l.testedLimitMm3s) : null;
                  return (
                    <tr key={l.materialFamily}>
                      <td>{MATERIALS[l.materialFamily as keyof typeof MATERIALS]?.label ?? l.materialFamily}</td>
                      <td className="num">{l.testedAt === null ? 'not tested' : l.testedLimitMm3s === null ? `no step passed (${formatDate(l.testedAt)})` : `${formatNumber(l.testedLimitMm3s, 1, 'mm³/s')} at ≥ ${l.thresholdPercent} % (${formatDate(l.testedAt)})`}</td>
                      <td className="num">{c ? `${formatNumber(c.speed, 0, 'mm/s')}${c.byMachine ? ' (machine limit)' : ''}` : '—'}</td>
                      <td className="num">{l.verifiedEntries}</td>
                      <td className="num">{l.verifiedP95FlowMm3s === null && l.verifiedPeakFlowMm3s === null ? '—' : `${formatNumber(l.verifiedP95FlowMm3s, 1)} · ${formatNumber(l.verifiedPeakFlowMm3s, 1, 'mm³/s')}`}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
      </section>
      <TimesOverSeasons points={h.best_per_season} />
      <HistoryTable entries={h.entries} show="entrant" />
    </div>
  );
}
