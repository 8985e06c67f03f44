import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth/guard';
import { entryView } from '@/lib/entries';
import { latestFlowLimitMm3s } from '@/lib/machines';
import { HttpError } from '@/lib/errors';
import { StatePill } from '@/components/StatePill';
import { SafetyNotes } from '@/components/SafetyNotes';
import { EntryWorkbench } from '@/components/entrant/EntryWorkbench';
import { Providers } from '@/components/Providers';
import { EntryDetailsForm } from '@/components/entrant/EntryDetailsForm';
import { formatDateTime, formatDurationMs } from '@/lib/format';
import { reasonLabel } from '@/lib/reviews/reasons';
import { parseId } from '@/lib/ids';

export const metadata = { title: 'Entry' };
export const dynamic = 'force-dynamic';

const DECISION_LABEL: Record<string, string> = { verify: 'Verified', reject: 'Rejected', return: 'Returned for changes' };

export default async function EntryPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const user = await requirePageRole(`/me/entries/${id}`, 'entrant');
  let entry;
  try {
    entry = await entryView(user, parseId(id) ?? NaN);
  } catch (err) {
    if (err instanceof HttpError && err.status === 404) notFound();
    throw err;
  }
  const limit = await latestFlowLimitMm3s(entry.machine.id, entry.materialFamily);
  const m = entry.measuredMm;
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <p className="text-sm"><Link href="/me">My entries</Link></p>
          <h1>Entry #{entry.id} · {entry.season.name}</h1>
          <p className="text-ink-600">{entry.class.name} · {entry.machine.name} · {entry.materialLabel}{entry.materialName ? ` (${entry.materialName})` : ''} · {entry.nozzleMm} mm nozzle</p>
        </div>
        <StatePill state={entry.state} />
      </div>

      <div className="grid gap-6 lg:grid-cols-3">
        <section className="card lg:col-span-2" aria-labelledby="details-h">
          <h2 id="details-h" className="mb-3">Details</h2>
          <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1 text-sm">
            <dt className="text-ink-600">Claimed time</dt><dd className="num" data-testid="claimed-time">{formatDurationMs(entry.claimedTimeMs)}</dd>
            <dt className="text-ink-600">Evidence video</dt><dd>{entry.evidenceUrl ? <a href={entry.evidenceUrl} rel="noopener noreferrer nofollow" target="_blank">{entry.evidenceUrl}</a> : '—'}</dd>
            <dt className="text-ink-600">Measured size</dt><dd className="num">{m.x !== null && m.y !== null && m.z !== null ? `${m.x} × ${m.y} × ${m.z} mm` : '—'}{entry.testPieceSizeMm ? ` (test piece ${entry.testPieceSizeMm.x} × ${entry.testPieceSizeMm.y} × ${entry.testPieceSizeMm.z} mm)` : ''}</dd>
            <dt className="text-ink-600">Machine limit</dt><dd className="num">{limit ? `${limit.limitMm3s} mm³/s (latest extrusion-limit test)` : 'no extrusion-limit test for this material'}</dd>
            <dt className="text-ink-600">Submitted</dt><dd>{formatDateTime(entry.submittedAt)}</dd>
            <dt className="text-ink-600">G-code</dt><dd>{entry.files.gcode ? <a href={entry.files.gcode.url}>{entry.files.gcode.name}</a> : '—'}</dd>
            <dt className="text-ink-600">Project file</dt><dd>{entry.files.project ? <a href={entry.files.project.url}>{entry.files.project.name}</a> : '—'}</dd>
            {entry.notes && (<><dt className="text-ink-600">Notes</dt><dd className="whitespace-pre-wrap">{entry.notes}</dd></>)}
          </dl>
        </section>
        <section className="card" aria-labelledby="photos-h">
          <h2 id="photos-h" className="mb-3">Photos ({entry.files.photos.length}/{entry.season.photosRequired})</h2>
          <ul className="grid grid-cols-2 gap-3" data-testid="entry-photos">
            {entry.files.photos.map((p) => (
              <li key={p.id} className="text-xs text-ink-600">
                <a href={p.url}>
                  {p.thumbnailUrl ? <img src={p.thumbnailUrl} alt={`Photo ${p.name}`} className="aspect-square w-full rounded object-cover" /> : <span className="flex aspect-square items-center justify-center rounded bg-ink-100 p-2 text-center">no thumbnail</span>}
                </a>
                <span className="block truncate">{p.name}</span>
                {p.capturedAt && <span className="block">taken {p.capturedAt.replace('T', ' ')}</span>}
                {p.locationRemoved && <span className="block">location removed</span>}
              </li>
            ))}
          </ul>
        </section>
      </div>

      {entry.windowProblem && <p className="card text-sm" role="status" data-testid="window-problem">{entry.windowProblem}</p>}
      {entry.canEdit && <EntryDetailsForm entry={entry} />}

      <Providers>
        <EntryWorkbench entry={entry} limitMm3s={limit?.limitMm3s ?? null} />
      </Providers>

      {entry.canEdit && <SafetyNotes />}

      <div className="grid gap-6 lg:grid-cols-2">
        <section className="card" aria-labelledby="ihist-h">
          <h2 id="ihist-h" className="mb-3">Inspection history</h2>
          <table className="table" data-testid="inspection-history">
            <thead><tr><th>When</th><th>File</th><th>Status</th><th>Blocking</th><th>Notes</th></tr></thead>
            <tbody>
              {entry.inspections.map((i) => (
                <tr key={i.id}><td>{formatDateTime(i.createdAt)}</td><td>{i.fileName ?? '—'}</td><td>{i.status}</td><td className="num">{i.status === 'done' ? i.blockingFailures : '—'}</td><td className="num">{i.status === 'done' ? i.advisoryFlags : '—'}</td></tr>
              ))}
            </tbody>
          </table>
        </section>
        <section className="card" aria-labelledby="rhist-h">
          <h2 id="rhist-h" className="mb-3">Review history</h2>
          {entry.reviews.length === 0 ? <p className="text-sm text-ink-600">No reviews yet.</p> : (
            <ul className="space-y-3 text-sm">
              {entry.reviews.map((r) => (
                <li key={r.id}>
                  <p className="font-semibold">{DECISION_LABEL[r.decision] ?? r.decision} · {formatDateTime(r.createdAt)}</p>
                  {r.reasonCodes.length > 0 && <ul className="list-disc pl-5 text-ink-600">{r.reasonCodes.map((c) => <li key={c}>{reasonLabel(c)}</li>)}</ul>}
                  {r.note && <p className="whitespace-pre-wrap">{r.note}</p>}
                </li>
              ))}
            </ul>
          )}
        </section>
      </div>
    </div>
  );
}
