import Link from 'next/link';
import { parseId, publicEntry } from '@/lib/standings/views';
import { inspectionVerdict } from '@/lib/standings/summary';
import { loadOr404 } from '@/components/standings/load';
import { LazyFlowChart } from '@/components/charts/lazy';
import { SeverityPill } from '@/components/SeverityPill';
import { formatDate, formatDateTime, formatDurationMs, formatDurationS, formatNumber } from '@/lib/format';
import { MATERIALS } from '@/lib/inspection/materials';
import { MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';
import { keptForVersion } from '@/lib/standings/publicCache';

export const metadata = { title: 'Entry' };

const VERDICT_STYLE = {
  pass: 'border-coolant-500 bg-coolant-50',
  open: 'border-ember-300 bg-ember-50',
  fail: 'border-alarm-500 bg-alarm-50',
  none: 'border-ink-200 bg-white',
} as const;

/**
 * A verified timed print: the printed test piece first (photos), beside it the inspection's verdict,
 * the figures (the claimed time among them) and the machine; the plain-words report and the flow
 * chart below.
 */
export default async function EntryPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const e = await loadOr404(keptForVersion(`entry:${id}`, async () => publicEntry(parseId(id, 'entry'))));
  const i = e.inspection;
  const verdict = inspectionVerdict(i && { rules: i.rules, flags: i.flags.length });
  const safeEvidence = /^https?:\/\//i.test(e.evidence_url) ? e.evidence_url : null;
  const [hero, ...more] = e.photos;
  const material = MATERIALS[e.material as keyof typeof MATERIALS]?.label ?? e.material;
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-ink-600">
        <Link href="/seasons">Seasons</Link> › <Link href={`/seasons/${e.season.slug}`}>{e.season.name}</Link> ›{' '}
        <Link href={`/seasons/${e.season.slug}/classes/${e.class.slug}`}>{e.class.name}</Link> › Entry {e.id}
      </nav>
      <header className="space-y-1">
        <h1>
          Test piece printed on <Link href={`/machines/${e.machine.id}`}>{e.machine.name}</Link>
        </h1>
        <p className="text-ink-700">
          {e.material_name || material} · {e.nozzle_mm} mm nozzle · entered by{' '}
          <Link href={`/entrants/${e.entrant.id}`}>{e.entrant.name}</Link> in {e.class.name} · submitted {formatDate(e.submitted_at)}
        </p>
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

      <div className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <section aria-label="Photos of the printed test piece" className="space-y-3">
          {hero ? (
            <>
              <figure className="card p-2">
                <a href={hero.url} target="_blank" rel="noopener noreferrer">
                  {/* eslint-disable-next-line @next/next/no-img-element -- photos stream from our API, not the image optimizer */}
                  <img src={hero.url} alt={`The printed test piece of entry ${e.id}: ${hero.name}`} className="aspect-[4/3] w-full rounded bg-ink-100 object-contain" data-testid="entry-hero-photo" />
                </a>
                <figcaption className="px-1 pt-2 text-xs text-ink-600">The printed test piece{more.length ? ` · ${more.length + 1} photos` : ''} · open a photo at full size</figcaption>
              </figure>
              {!!more.length && (
                <ul className="grid grid-cols-3 gap-2 sm:grid-cols-4">
                  {more.map((p) => (
                    <li key={p.id}>
                      <a href={p.url} target="_blank" rel="noopener noreferrer" className="block rounded border border-ink-200 bg-white p-1">
                        {/* eslint-disable-next-line @next/next/no-img-element -- photos stream from our API, not the image optimizer */}
                        <img src={p.url} alt={`Photo of entry ${e.id}: ${p.name}`} className="aspect-square w-full rounded object-cover" loading="lazy" />
                      </a>
                    </li>
                  ))}
                </ul>
              )}
            </>
          ) : (
            <div className="card flex aspect-[4/3] items-center justify-center text-center text-sm text-ink-600">No photos of the printed test piece were uploaded with this entry.</div>
          )}
        </section>

        <div className="space-y-4">
          <section className={`rounded-xl border-2 p-5 shadow-sm ${VERDICT_STYLE[verdict.tone]}`} aria-labelledby="h-verdict" data-testid="entry-verdict">
            <h2 id="h-verdict" className="text-sm font-semibold uppercase tracking-wide text-ink-600">Inspection verdict</h2>
            <p className="mt-1 text-xl font-bold text-ink-900">{verdict.headline}</p>
            <p className="text-sm text-ink-700">
              {verdict.flags}
              {e.status === 'verified'
                ? <> · verified by the judges{e.decided_at ? ` on ${formatDateTime(e.decided_at)}` : ''}</>
                : <> · back with the judges</>}
            </p>
            {!!i?.flags.length && (
              <ul className="mt-3 space-y-1 text-sm">
                {i.flags.map((f, k) => <li key={k}><SeverityPill severity={f.severity} /> {f.message}</li>)}
              </ul>
            )}
          </section>

          <section className="card" aria-labelledby="h-figures">
            <h2 id="h-figures" className="mb-3">Figures</h2>
            <dl className="grid grid-cols-2 gap-x-4 gap-y-3 text-sm" data-testid="entry-figures">
              <div>
                <dt className="text-ink-600">Claimed print time</dt>
                <dd className="num text-lg font-semibold">{formatDurationMs(e.time_ms)}</dd>
              </div>
              <div>
                <dt className="text-ink-600">Place in the class</dt>
                <dd className={e.rank ? 'num text-lg font-semibold' : 'text-ink-700'}>
                  {e.status !== 'verified'
                    ? 'Not ranked while the judges decide again'
                    : e.rank ?? 'Not the entrant’s ranked print'}
                </dd>
              </div>
              <div>
                <dt className="text-ink-600">Peak flow</dt>
                <dd className="num">{formatNumber(i?.peak_flow_mm3s, 1, 'mm³/s')}</dd>
              </div>
              <div>
                <dt className="text-ink-600">95th percentile flow</dt>
                <dd className="num">{formatNumber(i?.p95_flow_mm3s, 1, 'mm³/s')}</dd>
              </div>
              <div>
                <dt className="text-ink-600">Layer height</dt>
                <dd className="num">{formatNumber(i?.layer_height_mm, 2, 'mm')}</dd>
              </div>
              <div>
                <dt className="text-ink-600">Hotlap’s time estimate</dt>
                <dd className="num">{formatDurationS(i?.estimated_time_s)}</dd>
              </div>
            </dl>
          </section>

          <section className="card text-sm" aria-labelledby="h-machine">
            <h2 id="h-machine" className="mb-2">Machine and material</h2>
            <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1">
              <dt className="text-ink-600">Machine</dt>
              <dd><Link href={`/machines/${e.machine.id}`}>{e.machine.name}</Link> · {MOTION_SYSTEM_LABELS[e.machine.motion as MotionSystem] ?? e.machine.motion}</dd>
              {e.machine.hotend && (<><dt className="text-ink-600">Hotend</dt><dd>{e.machine.hotend}</dd></>)}
              <dt className="text-ink-600">Material</dt>
              <dd>{material}{e.material_name ? ` · ${e.material_name}` : ''}</dd>
              <dt className="text-ink-600">Nozzle</dt>
              <dd className="num">{e.nozzle_mm} mm</dd>
              {e.measured_size_mm.x != null && (
                <><dt className="text-ink-600">Measured size</dt><dd className="num">{e.measured_size_mm.x} × {e.measured_size_mm.y} × {e.measured_size_mm.z} mm</dd></>
              )}
              {safeEvidence && (<><dt className="text-ink-600">Video</dt><dd><a href={safeEvidence} rel="noopener noreferrer nofollow" target="_blank">Video of the print</a></dd></>)}
            </dl>
          </section>
        </div>
      </div>

      <section className="card text-sm" aria-labelledby="h-found">
        <h2 id="h-found" className="mb-2">What the inspection found</h2>
        {i ? (
          <ul className="list-disc space-y-1 pl-5" data-testid="inspection-summary">{i.summary.map((s) => <li key={s}>{s}</li>)}</ul>
        ) : (
          <p>No finished inspection is on record for this entry.</p>
        )}
      </section>

      {i?.flow_series && (
        <section className="card">
          <LazyFlowChart
            title="Commanded volumetric flow over the print"
            series={{ bucketS: i.flow_series.bucket_s, maxMm3s: i.flow_series.points.map((p) => p.max_mm3s), meanMm3s: i.flow_series.points.map((p) => p.mean_mm3s) }}
          />
        </section>
      )}
    </div>
  );
}
