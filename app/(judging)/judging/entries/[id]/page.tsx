import Link from 'next/link';
import { headers } from 'next/headers';
import { notFound, forbidden } from 'next/navigation';
import { requirePageRole } from '@/lib/auth/guard';
import { clientIp } from '@/lib/http';
import { HttpError } from '@/lib/errors';
import { entryReview, type EntryReview } from '@/lib/reviews/entry';
import { EntryParams } from '@/lib/reviews/params';
import { DECISION_LABELS, reasonLabel } from '@/lib/reviews/reasons';
import { CHECKLIST_ITEMS, CHECK_ANSWER_LABELS, type CheckAnswer, type ChecklistItem } from '@/lib/reviews/checklist';
import { DECIDABLE_STATES } from '@/lib/reviews/schemas';
import { MOTION_SYSTEM_LABELS, type MotionSystem, type ReviewDecision } from '@/lib/domain';
import { formatDurationMs, formatDurationS, formatDateTime, formatNumber } from '@/lib/format';
import { StatePill } from '@/components/StatePill';
import { formatRuleMeasured } from '@/lib/inspection/rules';
import { settingLabel, settingOutOfTolerance } from '@/lib/reviews/report';
import { PhotoGallery } from '@/components/judging/PhotoGallery';
import { LayerPreview } from '@/components/judging/LayerPreview';
import { FlowChart } from '@/components/charts/FlowChart';
import { SeverityPill } from '@/components/SeverityPill';
import { DecisionForm } from '@/components/judging/DecisionForm';
import { DecidedNote } from '@/components/judging/DecidedNote';
import { ownLatestDecision, queueNeighbours, queueSearchParams, QueueFilterSchema, type QueueFilter } from '@/lib/reviews/queue';
import { parseId } from '@/lib/ids';

export const metadata = { title: 'Review an entry' };

const STATUS_TONE: Record<string, string> = { pass: 'bg-coolant-100 text-coolant-700', fail: 'bg-alarm-100 text-alarm-700', unknown: 'bg-ink-100 text-ink-700' };

async function load(judgeId: number, id: number): Promise<EntryReview> {
  try {
    return await entryReview(judgeId, id, { ip: clientIp(await headers()) });
  } catch (err) {
    if (err instanceof HttpError && err.status === 404) notFound();
    if (err instanceof HttpError && err.status === 403) forbidden();
    throw err;
  }
}

export default async function ReviewPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const raw = await params;
  const query = await searchParams;
  const judge = await requirePageRole(`/judging/entries/${raw.id}`, 'judge');
  const parsed = EntryParams.safeParse(raw);
  if (!parsed.success) notFound();
  const r = await load(judge.id, parsed.data.id);
  // The queue's view, filters and sort come along in the URL, so previous/next walk the same list.
  const filterParsed = QueueFilterSchema.safeParse(Object.fromEntries(Object.entries(query).filter(([k, v]) => k !== 'decided' && typeof v === 'string')));
  const filter: QueueFilter = filterParsed.success ? { ...filterParsed.data, page: undefined } : {};
  const keep = queueSearchParams(filter);
  const withKeep = (path: string, extra?: Record<string, string>) => {
    const q = new URLSearchParams(keep);
    for (const [k, v] of Object.entries(extra ?? {})) q.set(k, v);
    const t = q.toString();
    return t ? `${path}?${t}` : path;
  };
  const decidedId = typeof query.decided === 'string' ? parseId(query.decided) : null;
  const [around, decidedNote] = await Promise.all([
    queueNeighbours(judge.id, r.entry.id, filter).catch(() => null),
    decidedId ? ownLatestDecision(judge.id, decidedId) : Promise.resolve(null),
  ]);
  // After a decision the judge goes on to the entry that followed this one (or back to the queue).
  const afterDecision = around?.next ? withKeep(`/judging/entries/${around.next}`, { decided: String(r.entry.id) }) : withKeep('/judging', { decided: String(r.entry.id) });
  const { entry, inspection: insp } = r;
  const estS = insp?.headline.estimatedS ?? null;
  const claimedS = entry.claimedTimeMs / 1000;
  const matching = r.extrusionTests.find((t) => t.matchesEntryMaterial) ?? null;
  const decidable = (DECIDABLE_STATES as readonly string[]).includes(entry.state) && !['final', 'archived'].includes(r.season?.state ?? '');
  return (
    <div className="space-y-6 xl:mx-[calc((70rem_-_min(100vw_-_4rem,1560px))/2)]" data-testid="review-desk">
      <nav aria-label="Queue" className="flex flex-wrap items-center gap-x-4 gap-y-2 text-sm" data-testid="queue-nav">
        <Link href={withKeep('/judging')}>← Back to the queue</Link>
        {around && (
          <>
            <span className="num text-ink-600" data-testid="queue-position">
              {around.position ? `Entry ${around.position} of ${around.count} in the ${filter.view === 'decided' ? 'decided list' : 'queue'}` : `Not in the ${filter.view === 'decided' ? 'decided list' : 'queue'} now (${around.count} there)`}
            </span>
            <span className="ml-auto flex gap-2">
              {around.previous ? <Link className="btn-quiet px-3 py-1" href={withKeep(`/judging/entries/${around.previous}`)} rel="prev" aria-label={`Previous entry (#${around.previous})`}>← Previous</Link> : <span className="btn-quiet cursor-not-allowed px-3 py-1 opacity-50" aria-disabled="true">← Previous</span>}
              {around.next ? <Link className="btn-quiet px-3 py-1" href={withKeep(`/judging/entries/${around.next}`)} rel="next" aria-label={`Next entry (#${around.next})`}>Next →</Link> : <span className="btn-quiet cursor-not-allowed px-3 py-1 opacity-50" aria-disabled="true">Next →</span>}
            </span>
          </>
        )}
      </nav>
      {decidedNote && <DecidedNote d={decidedNote} />}
      <header className="flex flex-wrap items-center gap-3">
        <h1>Entry #{entry.id}</h1>
        <StatePill state={entry.state} />
        <p className="w-full text-ink-600">
          {r.season?.name} · {r.className} · {r.entrant.name} · submitted {formatDateTime(entry.submittedAt)} · {entry.materialName || entry.materialFamily.toUpperCase()} · {entry.nozzleMm} mm nozzle
        </p>
      </header>

      <div className="xl:grid xl:grid-cols-[minmax(0,1fr)_25rem] xl:items-start xl:gap-6">
        <div className="min-w-0 space-y-6">
          <section className="grid gap-4 md:grid-cols-3">
            <div className="card">
              <h2>Claimed time</h2>
              <p className="num text-2xl" data-testid="claimed-time">{formatDurationMs(entry.claimedTimeMs)}</p>
              <p className="text-xs text-ink-500">{r.season?.timingConvention}</p>
            </div>
            <div className="card">
              <h2>Estimated minimum</h2>
              <p className="num text-2xl" data-testid="estimated-time">{formatDurationS(estS)}</p>
              {estS != null && (
                <p className={`text-sm ${claimedS < estS ? 'font-semibold text-alarm-700' : 'text-ink-600'}`}>
                  Claimed is {claimedS >= estS ? `${formatDurationS(claimedS - estS)} slower than` : `${formatDurationS(estS - claimedS)} faster than`} the file allows ({formatNumber(((claimedS - estS) / estS) * 100, 1, '%')}).
                </p>
              )}
              {insp?.headline.slicerEstimateS != null && <p className="text-xs text-ink-500">Slicer’s own estimate: {formatDurationS(insp.headline.slicerEstimateS)}</p>}
            </div>
            <div className="card">
              <h2>Evidence</h2>
              {entry.evidenceLink ? <p><a href={entry.evidenceLink} target="_blank" rel="noopener noreferrer" data-testid="evidence-link">Open the video of the print</a></p> : <p className="text-ink-600">No evidence link.</p>}
              {r.gcode && <p className="mt-2 text-sm"><a href={r.gcode.url}>Download the G-code</a> <span className="num text-ink-500">({(r.gcode.sizeBytes / 1024).toFixed(0)} KB)</span></p>}
              {entry.notes && <p className="mt-2 whitespace-pre-line text-sm text-ink-700">{entry.notes}</p>}
            </div>
          </section>

          {r.pendingInspection && (
            <p className="rounded-lg bg-ember-50 p-3 text-sm text-ember-800" role="status" data-testid="pending-inspection">
              A new inspection (#{r.pendingInspection.id}) is {r.pendingInspection.status}{r.pendingInspection.error ? `: ${r.pendingInspection.error}` : ''}. The figures below are from the previous finished inspection; reload when it is done to see what changed.
            </p>
          )}
          {r.reinspection?.reopened && r.entry.state === 'submitted' && (
            <section className="card border-alarm-300" role="status" data-testid="reopened-banner">
              <h2>Back from the standings</h2>
              <p className="text-sm">
                This entry was verified; the re-inspection of {formatDateTime(r.reinspection.at)} {r.reinspection.rulebookChanged ? 'after the rulebook changed' : 'requested by the organizer'} fails a blocking rule, so it left the standings and needs a new decision. What changed:
              </p>
              <ul className="list-disc pl-5 text-sm">{r.reinspection.changes.map((c) => <li key={c.metric + c.sentence}>{c.text}</li>)}</ul>
            </section>
          )}
          {r.changes && (
            <section className="card border-ember-300" data-testid="inspection-changes">
              <h2>What changed since the previous inspection</h2>
              <p className="text-xs text-ink-500">Inspection #{r.changes.previous.id} (engine {r.changes.previous.engineVersion}, {formatDateTime(r.changes.previous.createdAt)}) → #{r.changes.latest.id} (engine {r.changes.latest.engineVersion}, {formatDateTime(r.changes.latest.createdAt)})</p>
              {r.changes.unchanged ? <p className="mt-2">Nothing the judges see changed.</p> : (
                <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
                  {r.changes.headline.map((h) => <li key={h.key}>{h.label}: <span className="num">{h.before ?? '—'} → {h.after ?? '—'} {h.unit}</span></li>)}
                  {r.changes.rules.map((x, i) => <li key={i}>Rule “{x.sentence}”{x.sentenceBefore ? ` (was “${x.sentenceBefore}”)` : ''}: {x.before ?? 'absent'} → {x.after ?? 'absent'} (measured {String(x.measuredBefore ?? '—')} → {String(x.measuredAfter ?? '—')})</li>)}
                  {r.changes.flagsAdded.map((f) => <li key={`+${f.code}`}>New flag: {f.message || f.code}</li>)}
                  {r.changes.flagsRemoved.map((c) => <li key={`-${c}`}>Flag gone: {c}</li>)}
                </ul>
              )}
            </section>
          )}

          {/* Evidence beside the toolpath preview, same height on a wide screen. */}
          <div className="grid grid-cols-1 gap-6 *:min-w-0 xl:grid-cols-[minmax(0,2fr)_minmax(0,3fr)] xl:items-stretch" data-testid="evidence-row">
            <section className="card h-full">
              <h2 className="mb-3">Photos</h2>
              <PhotoGallery photos={r.photos} />
            </section>

            {insp?.previewUrl && (
              <section className="card h-full min-w-0">
                <h2 className="mb-3">Toolpath preview</h2>
                <LayerPreview url={insp.previewUrl} reportLayers={{ zMm: insp.headline.layerZMm, count: insp.headline.layers, timeS: insp.headline.layerTimeS }} />
              </section>
            )}

            {!insp?.previewUrl && (
              <section className="card h-full">
                <h2 className="mb-3">Toolpath preview</h2>
                <p className="text-sm text-ink-600">No preview: the G-code has not been inspected yet.</p>
              </section>
            )}
          </div>
          {/* Rule results and settings beside the flags. */}
          <div className="grid grid-cols-1 gap-6 *:min-w-0 xl:grid-cols-2 xl:items-start" data-testid="findings-row">
            <section className="card space-y-4">
              <h2>Inspection</h2>
              {!insp ? <p>This entry has not been inspected yet.</p> : insp.status !== 'done' ? <p>Inspection {insp.status}{insp.error ? `: ${insp.error}` : ''}.</p> : (
                <>
                  <p className="num text-sm text-ink-700">
                    Peak flow {formatNumber(insp.headline.peakFlowMm3s, 1, 'mm³/s')} · 95th percentile {formatNumber(insp.headline.p95FlowMm3s, 1, 'mm³/s')} · mean {formatNumber(insp.headline.meanFlowMm3s, 1, 'mm³/s')} · {insp.headline.layers ?? '—'} layers of {formatNumber(insp.headline.layerHeightMm, 2, 'mm')} · {formatNumber(insp.headline.massG, 1, 'g')} · {insp.headline.slicer ?? 'unknown slicer'} · engine {insp.engineVersion}
                  </p>
                  <div className="overflow-x-auto">
                    <h3 className="font-semibold">Rule results</h3>
                    <table className="table" data-testid="rule-results">
                      <thead><tr><th>Rule</th><th>Severity</th><th>Measured</th><th>Result</th></tr></thead>
                      <tbody>
                        {insp.ruleResults.map((x, i) => (
                          <tr key={i}><td>{x.rule?.sentence || x.message}</td><td>{x.rule?.severity}</td><td className="num">{formatRuleMeasured(x.rule?.metric, x.measured)}</td><td><span className={`pill ${STATUS_TONE[x.status] ?? ''}`}>{x.status}</span></td></tr>
                        ))}
                      </tbody>
                    </table>
                  </div>
                </>
              )}
            </section>

            {insp?.status === 'done' && (
              <section className="card space-y-3" aria-label="Flags and settings">
                  <div>
                    <h2>Flags</h2>
                    {insp.flags.length === 0 ? <p className="text-sm">No flags.</p> : (
                      <ul className="space-y-1 text-sm" data-testid="flags">
                        {insp.flags.map((f, i) => <li key={i}><SeverityPill severity={f.severity} /> {f.message || f.code}</li>)}
                      </ul>
                    )}
                  </div>
                  <div className="overflow-x-auto">
                    <h2 className="pt-2">Settings: declared in the file vs measured from the toolpaths</h2>
                    <table className="table" data-testid="settings">
                      <thead><tr><th>Setting</th><th>Declared</th><th>Measured</th><th>How measured</th></tr></thead>
                      <tbody>
                        {insp.settings.map((s) => (
                          <tr key={s.key} className={settingOutOfTolerance(s) ? 'bg-ember-50' : ''} data-off={settingOutOfTolerance(s) ? 'true' : undefined}>
                            <td>{settingLabel(s.key)}</td><td className="num">{s.declared ?? '—'}</td><td className="num">{s.measured ?? '—'}</td><td className="text-xs text-ink-500">
                              {s.detail}
                              {s.extraLoopLayers && (
                                <span className="block text-ink-700" data-testid="extra-loop-layers">
                                  More loops on {s.extraLoopLayerCount} layer{s.extraLoopLayerCount === 1 ? '' : 's'}: {s.extraLoopLayers.map((l) => `Z ${l.zMm} mm (${l.walls})`).join(', ')}
                                  {(s.extraLoopLayerCount ?? 0) > s.extraLoopLayers.length ? ', …' : ''}
                                </span>
                              )}
                            </td>
                          </tr>
                        ))}
                      </tbody>
                    </table>
                  </div>
              </section>
            )}
          </div>
          {insp && insp.status === 'done' && (
            <section className="card">
              <FlowChart title="Flow over time" series={insp.flowSeries} limitMm3s={matching?.limitFlowMm3s ?? null} />
            </section>
          )}

          <section className="card space-y-3">
            <h2>Machine{r.machine ? `: ${r.machine.name}` : ''}</h2>
            {r.machine && (
              <p className="text-sm text-ink-700">
                {MOTION_SYSTEM_LABELS[r.machine.motionSystem as MotionSystem] ?? r.machine.motionSystem} · build {r.machine.buildMm.x}×{r.machine.buildMm.y}×{r.machine.buildMm.z} mm · {r.machine.nozzleMm} mm nozzle · {r.machine.hotend} · {r.machine.extruder} · {r.machine.firmware}
                {r.machine.maxAccelMmS2 ? ` · accel ${r.machine.maxAccelMmS2} mm/s²` : ''}{r.machine.isModified ? ` · modified: ${r.machine.modifications}` : ' · stock'}
              </p>
            )}
            <h3 className="font-semibold">Extrusion-limit tests</h3>
            {r.extrusionTests.length === 0 ? <p className="text-sm text-ink-600">No extrusion-limit test on record for this machine.</p> : r.extrusionTests.map((t) => (
              <div key={t.id} className="overflow-x-auto" data-testid="extrusion-test">
                <p className="text-sm">
                  {t.materialName || t.materialFamily.toUpperCase()} ({t.materialFamily}) · {formatDateTime(t.testedAt)} · limit <strong className="num">{t.limitFlowMm3s ?? '—'} mm³/s</strong> at ≥ {t.thresholdPercent} %
                  {t.matchesEntryMaterial ? ' · same material family as the entry' : ''}{t.nonMonotonic ? ' · curve not monotonic' : ''}
                </p>
                <table className="table">
                  <thead><tr><th>Rate, mm³/s</th><th>Mass, g</th><th>Efficiency</th><th></th></tr></thead>
                  <tbody>{t.steps.map((s) => <tr key={s.rateMm3s}><td className="num">{s.rateMm3s}</td><td className="num">{s.massG.toFixed(3)}</td><td className="num">{s.efficiencyPercent.toFixed(1)} %</td><td>{s.passes ? 'pass' : 'below threshold'}</td></tr>)}</tbody>
                </table>
              </div>
            ))}
          </section>

          <section className="card">
            <h2 className="mb-3">Decisions so far</h2>
            {r.reviews.length === 0 ? <p className="text-sm">No decision yet.</p> : (
              <ol className="space-y-3" data-testid="review-history">
                {r.reviews.map((v) => (
                  <li key={v.id} className="border-l-4 border-ink-200 pl-3">
                    <p className="text-sm"><strong>{v.judge}</strong> {DECISION_LABELS[v.decision as ReviewDecision]?.past ?? v.decision} · {formatDateTime(v.createdAt)}</p>
                    <p className="text-sm">{v.reasonCodes.map(reasonLabel).join('; ')}</p>
                    <p className="whitespace-pre-line text-sm text-ink-700">{v.note}</p>
                    {Object.keys(v.checklist ?? {}).length > 0 && (
                      <p className="text-xs text-ink-500">
                        {Object.entries(v.checklist).map(([k, a]) => `${CHECKLIST_ITEMS[k as ChecklistItem]?.label ?? k}: ${CHECK_ANSWER_LABELS[a as CheckAnswer] ?? a}`).join(' · ')}
                      </p>
                    )}
                  </li>
                ))}
              </ol>
            )}
          </section>

        </div>
        {/* The decision stays in view while the judge scrolls the evidence. */}
        <aside className="mt-6 xl:sticky xl:top-4 xl:mt-0 xl:max-h-[calc(100vh-2rem)] xl:overflow-y-auto" aria-label="Your decision" data-testid="decision-aside">
          <section className="card" data-testid="decision-panel">
            <h2 className="mb-3">{entry.state === 'submitted' ? 'Your decision' : 'Record a new decision'}</h2>
            {decidable ? (
              <DecisionForm afterDecision={afterDecision} entryId={entry.id} entryState={entry.state} dimensions={r.dimensions} verifications={r.verifications} />
            ) : (
              <p className="text-sm">This entry cannot be decided now ({entry.state}{r.season && ['final', 'archived'].includes(r.season.state) ? `, season ${r.season.state}` : ''}).</p>
            )}
          </section>
        </aside>
      </div>
    </div>
  );
}
