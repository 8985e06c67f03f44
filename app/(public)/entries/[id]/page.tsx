import Link from 'next/link';
import { parseId, publicEntry } from '@/lib/standings/views';
import { loadOr404 } from '@/components/standings/load';
import { FlowChart } from '@/components/charts/FlowChart';
import { SeverityPill } from '@/components/SeverityPill';
import { formatDate, formatDateTime, formatDurationMs, formatDurationS, formatNumber } from '@/lib/format';
import { MATERIALS } from '@/lib/inspection/materials';
import { MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';

export const metadata = { title: 'Entry' };

export default async function EntryPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const e = await loadOr404((async () => publicEntry(parseId(id, 'entry')))());
  const i = e.inspection;
  const safeEvidence = /^https?:\/\//i.test(e.evidence_url) ? e.evidence_url : null;
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-ink-600">
        <Link href="/seasons">Seasons</Link> › <Link href={`/seasons/${e.season.slug}`}>{e.season.name}</Link> ›{' '}
        <Link href={`/seasons/${e.season.slug}/classes/${e.class.slug}`}>{e.class.name}</Link> › Entry {e.id}
      </nav>
      <header className="space-y-1">
        <h1>
          <span className="num">{formatDurationMs(e.time_ms)}</span> by <Link href={`/entrants/${e.entrant.id}`}>{e.entrant.name}</Link>
        </h1>
        {e.status === 'verified' ? (
          <p className="text-ink-700">
            {e.rank ? <>Rank <strong className="num">{e.rank}</strong> in {e.class.name}</> : <>Not the entrant’s ranked run in {e.class.name}</>} · verified{' '}
            {e.decided_at ? formatDateTime(e.decided_at) : ''} · submitted {formatDate(e.submitted_at)}
          </p>
        ) : (
          <p className="text-ink-700">Not ranked in {e.class.name} while the judges decide again · submitted {formatDate(e.submitted_at)}</p>
        )}
        {e.reinspection && (
          <p className="card text-sm" role="status" data-testid="reinspection-note">
            Re-inspected on {formatDate(e.reinspection.at)} {e.reinspection.rulebook_changed ? 'after the rulebook changed' : 'at the organizer’s request'};{' '}
            {e.status !== 'verified'
              ? 'back with the judges.'
              : e.reinspection.reopened
                ? `back with the judges, who verified it again${e.decided_at ? ` on ${formatDate(e.decided_at)}` : ''}.`
                : 'it passes every blocking rule and its verification stands.'}
          </p>
        )}
      </header>

      <section className="grid gap-4 md:grid-cols-3">
        <div className="card text-sm">
          <h2 className="mb-2">Run</h2>
          <dl className="space-y-1">
          <dt className="font-semibold">Machine</dt>
          <dd><Link href={`/machines/${e.machine.id}`}>{e.machine.name}</Link> ({MOTION_SYSTEM_LABELS[e.machine.motion as MotionSystem] ?? e.machine.motion})</dd>
          <dt className="font-semibold">Material</dt>
          <dd>{MATERIALS[e.material as keyof typeof MATERIALS]?.label ?? e.material}{e.material_name ? ` · ${e.material_name}` : ''}</dd>
          <dt className="font-semibold">Nozzle</dt>
          <dd className="num">{e.nozzle_mm} mm</dd>
          {e.machine.hotend && (<><dt className="font-semibold">Hotend</dt><dd>{e.machine.hotend}</dd></>)}
          {e.measured_size_mm.x != null && (
            <><dt className="font-semibold">Measured size</dt><dd className="num">{e.measured_size_mm.x} × {e.measured_size_mm.y} × {e.measured_size_mm.z} mm</dd></>
          )}
          {safeEvidence && (<><dt className="font-semibold">Evidence</dt><dd><a href={safeEvidence} rel="noopener noreferrer nofollow" target="_blank">Video of the run</a></dd></>)}
          </dl>
        </div>
        <div className="card text-sm">
          <h2 className="mb-2">Inspection figures</h2>
          <dl className="space-y-1">
          <dt className="font-semibold">Peak flow</dt><dd className="num">{formatNumber(i?.peak_flow_mm3s, 1, 'mm³/s')}</dd>
          <dt className="font-semibold">95th percentile flow</dt><dd className="num">{formatNumber(i?.p95_flow_mm3s, 1, 'mm³/s')}</dd>
          <dt className="font-semibold">Layer height</dt><dd className="num">{formatNumber(i?.layer_height_mm, 2, 'mm')}</dd>
          <dt className="font-semibold">Estimated print time</dt><dd className="num">{formatDurationS(i?.estimated_time_s)}</dd>
          {!!i && i.rules.pass + i.rules.fail + i.rules.unknown > 0 && (<><dt className="font-semibold">Rulebook</dt><dd>{i.rules.pass} pass · {i.rules.fail} fail · {i.rules.unknown} not measured</dd></>)}
          </dl>
        </div>
        <section className="card text-sm" aria-label="Inspection summary">
          <h2 className="mb-2">What the inspection found</h2>
          {i ? (
            <ul className="list-disc space-y-1 pl-5" data-testid="inspection-summary">{i.summary.map((s) => <li key={s}>{s}</li>)}</ul>
          ) : (
            <p>No finished inspection is on record for this entry.</p>
          )}
          {!!i?.flags.length && (
            <ul className="mt-3 space-y-1">
              {i.flags.map((f, k) => <li key={k}><SeverityPill severity={f.severity} /> {f.message}</li>)}
            </ul>
          )}
        </section>
      </section>

      {i?.flow_series && (
        <section className="card">
          <FlowChart
            title="Commanded volumetric flow over the print"
            series={{ bucketS: i.flow_series.bucket_s, maxMm3s: i.flow_series.points.map((p) => p.max_mm3s), meanMm3s: i.flow_series.points.map((p) => p.mean_mm3s) }}
          />
        </section>
      )}

      <section aria-label="Photos">
        <h2 className="mb-3">Photos</h2>
        {e.photos.length ? (
          <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
            {e.photos.map((p) => (
              <li key={p.id} className="card p-2">
                {/* eslint-disable-next-line @next/next/no-img-element -- photos stream from our API, not the image optimizer */}
                <img src={p.url} alt={`Photo of entry ${e.id}: ${p.name}`} className="h-64 w-full rounded object-cover" loading="lazy" />
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-sm text-ink-600">No photos were uploaded with this entry.</p>
        )}
      </section>
    </div>
  );
}
