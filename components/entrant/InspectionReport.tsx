/**
 * An inspection as people read it: status, each rule with pass/fail/unknown, the measured value
 * and where it came from, the flags, key figures and the flow chart. Works on the JSON the
 * entries library returns (inspectionJson), so judging and public pages can show it too.
 */
import { FlowChart } from '@/components/charts/FlowChart';
import { SeverityPill } from '@/components/SeverityPill';
import type { InspectionJson } from '@/lib/entries/inspection';
import { formatRuleMeasured } from '@/lib/inspection/rules';
import { formatDurationS, formatNumber } from '@/lib/format';

const STATUS_TONE = { pass: 'bg-coolant-100 text-coolant-700', fail: 'bg-alarm-100 text-alarm-700', unknown: 'bg-ink-100 text-ink-700' } as const;
const SOURCE_LABEL: Record<string, string> = { measured: 'measured from the toolpaths', declared: 'declared by the slicer', default: 'default', claimed: 'claimed', option: 'option' };

function pair(p: { declared: number | null; measured: number | null } | null, digits = 0, unit = '') {
  if (!p) return '—';
  const m = p.measured ?? p.declared;
  return m === null ? '—' : `${formatNumber(m, digits, unit)}${p.measured === null ? ' (declared)' : ''}`;
}

/** Flags about what the entrant claimed (time), which the details fix, not a new G-code. */
const CLAIM_FLAGS = new Set(['claimed_time_below_estimate', 'mean_flow_above_machine_limit']);

export function InspectionReport({ inspection, limitMm3s = null, audience = 'entrant' }: { inspection: InspectionJson; limitMm3s?: number | null; audience?: 'entrant' | 'judge' | 'public' }) {
  if (inspection.status === 'queued' || inspection.status === 'running') {
    return (
      <div className="card" role="status" aria-live="polite" data-testid="inspection-status">
        <p className="font-semibold">Inspecting {inspection.fileName ?? 'the G-code'}…</p>
        <p className="text-sm text-ink-600">The report appears here when the inspection finishes; this takes a few seconds for a typical file.</p>
      </div>
    );
  }
  if (inspection.status === 'failed') {
    return (
      <div className="card border-alarm-500" role="alert" data-testid="inspection-status">
        <p className="font-semibold text-alarm-700">The inspection could not finish</p>
        <p className="text-sm">{inspection.error}</p>
      </div>
    );
  }
  const f = inspection.figures;
  const blockingRules = inspection.ruleResults.filter((r) => r.status === 'fail' && r.rule.severity === 'blocking');
  const blockingFlags = inspection.flags.filter((x) => x.severity === 'blocking');
  return (
    <div className="space-y-5" data-testid="inspection-report">
      <div className={`rounded-xl border p-4 ${inspection.blockingFailures ? 'border-alarm-500 bg-alarm-50' : 'border-coolant-500 bg-coolant-50'}`} data-testid="inspection-summary">
        {inspection.blockingFailures ? (
          <>
            <p className="font-semibold text-alarm-700">{inspection.blockingFailures} blocking problem{inspection.blockingFailures > 1 ? 's' : ''} {audience === 'entrant' ? '— fix before submitting' : ''}</p>
            <ul className="mt-1 list-disc pl-5 text-sm">
              {blockingRules.map((r, i) => <li key={`r${i}`}>{r.message}</li>)}
              {blockingFlags.map((x, i) => <li key={`f${i}`}>{x.message}</li>)}
            </ul>
            {audience === 'entrant' && (
              <>
                {/* A claim that does not fit the file is fixed in the details, not by slicing again. */}
                {blockingFlags.some((x) => CLAIM_FLAGS.has(x.code)) && (
                  <p className="mt-2 text-sm" data-testid="claim-hint">Check the claimed time you entered against your timing (video or printer log) and correct it under “Edit details”; the file itself may be fine.</p>
                )}
                {/* A copy of another entry's G-code is not fixed by slicing: the entrant uploads their own print's file. */}
                {(blockingRules.length > 0 || blockingFlags.some((x) => !CLAIM_FLAGS.has(x.code) && x.code !== 'duplicate_gcode')) && (
                  <p className="mt-2 text-sm">Change the slicer settings named above, slice again and upload the new G-code.</p>
                )}
              </>
            )}
          </>
        ) : (
          <p className="font-semibold text-coolant-700">No blocking problems. {inspection.advisoryFlags ? `${inspection.advisoryFlags} note${inspection.advisoryFlags > 1 ? 's' : ''} for the judges.` : ''}</p>
        )}
      </div>

      <div className="grid gap-5 lg:grid-cols-[3fr_2fr]">
        <section aria-labelledby="rules-h">
          <h3 id="rules-h" className="mb-2 font-semibold">Rules</h3>
          <table className="table" data-testid="rule-results">
            <thead><tr><th>Result</th><th>Rule</th><th>Measured</th><th>Source</th></tr></thead>
            <tbody>
              {inspection.ruleResults.map((r, i) => (
                <tr key={i} data-status={r.status}>
                  <td><span className={`pill ${STATUS_TONE[r.status]}`}>{r.status}</span>{r.rule.severity === 'advisory' && <span className="ml-1 text-xs text-ink-500">advisory</span>}</td>
                  <td>{r.message.split(/ (Passes|Fails|Not checked):/)[0]}</td>
                  <td className="num">{formatRuleMeasured(r.rule?.metric, r.measured)}</td>
                  <td className="text-xs text-ink-600">{r.source ? SOURCE_LABEL[r.source] ?? r.source : r.message.includes('Not checked') ? r.message.split('Not checked: ')[1] : '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
        <section aria-labelledby="figures-h">
          <h3 id="figures-h" className="mb-2 font-semibold">Key figures</h3>
          <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm" data-testid="key-figures">
            <dt className="text-ink-600">Peak flow</dt><dd className="num">{formatNumber(f.peakFlowMm3s, 1, 'mm³/s')}</dd>
            <dt className="text-ink-600">95th percentile flow</dt><dd className="num">{formatNumber(f.p95FlowMm3s, 1, 'mm³/s')}</dd>
            <dt className="text-ink-600">Estimated time</dt><dd className="num">{formatDurationS(f.estimatedTimeS)}</dd>
            <dt className="text-ink-600">Slicer&apos;s estimate</dt><dd className="num">{formatDurationS(f.slicerEstimateS)}</dd>
            <dt className="text-ink-600">Layer height</dt><dd className="num">{formatNumber(f.layerHeightMm, 2, 'mm')}</dd>
            <dt className="text-ink-600">Walls</dt><dd className="num">{pair(f.walls)}</dd>
            <dt className="text-ink-600">Top / bottom layers</dt><dd className="num">{pair(f.topLayers)} / {pair(f.bottomLayers)}</dd>
            <dt className="text-ink-600">Sparse infill</dt><dd className="num">{pair(f.infillPercent, 1, '%')}</dd>
            <dt className="text-ink-600">Line width</dt><dd className="num">{pair(f.lineWidthMm, 2, 'mm')}</dd>
            <dt className="text-ink-600">Size X × Y × Z</dt><dd className="num">{f.sizeMm ? `${formatNumber(f.sizeMm.x, 1)} × ${formatNumber(f.sizeMm.y, 1)} × ${formatNumber(f.sizeMm.z, 1)} mm` : '—'}</dd>
            <dt className="text-ink-600">Objects</dt><dd className="num">{f.objects ?? '—'}</dd>
            <dt className="text-ink-600">Filament</dt><dd className="num">{formatNumber(f.filamentVolumeMm3, 0, 'mm³')} · {formatNumber(f.filamentMassG, 1, 'g')}</dd>
          </dl>
          {f.slicer && <p className="mt-2 text-xs text-ink-500">Sliced with {f.slicer}</p>}
        </section>
      </div>

      {inspection.flowSeries && <FlowChart series={inspection.flowSeries} limitMm3s={limitMm3s} />}

      <section aria-labelledby="flags-h">
        <h3 id="flags-h" className="mb-2 font-semibold">Flags</h3>
        {inspection.flags.filter((x) => x.severity !== 'info').length === 0 ? (
          <p className="text-sm text-ink-600">No plausibility flags.</p>
        ) : (
          <ul className="space-y-1 text-sm" data-testid="inspection-flags">
            {inspection.flags.filter((x) => x.severity !== 'info').map((x, i) => (
              <li key={i}><SeverityPill severity={x.severity} /> {x.message}</li>
            ))}
          </ul>
        )}
        {inspection.flags.some((x) => x.severity === 'info') && (
          <details className="mt-2 text-sm text-ink-600">
            <summary>Notes from the inspection ({inspection.flags.filter((x) => x.severity === 'info').length})</summary>
            <ul className="mt-1 list-disc pl-5">{inspection.flags.filter((x) => x.severity === 'info').map((x, i) => <li key={i}>{x.message}</li>)}</ul>
          </details>
        )}
      </section>
    </div>
  );
}
