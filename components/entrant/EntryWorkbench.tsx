'use client';
/**
 * The live part of an entry page: polls the inspection while it runs, shows the report, uploads
 * corrected files (with progress), and submits, withdraws or re-inspects.
 */
import { useEffect, useState } from 'react';
import { useRouter } from 'next/navigation';
import type { EntryView } from '@/lib/entries';
import type { InspectionJson } from '@/lib/entries/inspection';
import { InspectionReport } from './InspectionReport';
import { postJson, uploadWithProgress } from './upload';
import { UploadBar } from './UploadBar';
import { GCODE_ACCEPT, PHOTO_ACCEPT } from './NewEntryForm';

const POLL_MS = 1000;

export function EntryWorkbench({ entry, limitMm3s }: { entry: EntryView; limitMm3s: number | null }) {
  const router = useRouter();
  const [inspection, setInspection] = useState<InspectionJson | null>(entry.inspection);
  const [blockers, setBlockers] = useState<string[]>(entry.blockers);
  const [progress, setProgress] = useState<number | null>(null);
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [fileErrors, setFileErrors] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);
  const running = inspection?.status === 'queued' || inspection?.status === 'running';

  // A refreshed server render brings a new entry object: adopt its inspection (React's
  // "adjust state when a prop changes" pattern, during render rather than in an effect).
  const [seen, setSeen] = useState(entry);
  if (seen !== entry) {
    setSeen(entry);
    setInspection(entry.inspection);
    setBlockers(entry.blockers);
  }

  useEffect(() => {
    if (!running) return;
    let stop = false;
    const t = setInterval(async () => {
      const res = await fetch(`/api/entries/${entry.id}/inspection`, { cache: 'no-store' }).catch(() => null);
      if (!res?.ok || stop) return;
      const body = (await res.json()) as { inspection: InspectionJson | null; blockers: string[] };
      setInspection(body.inspection);
      setBlockers(body.blockers);
      // Finished: refresh the server-rendered parts (history, details) too.
      if (body.inspection && (body.inspection.status === 'done' || body.inspection.status === 'failed')) {
        setMessage((m) => (m?.tone === 'ok' ? null : m));
        router.refresh();
      }
    }, POLL_MS);
    return () => {
      stop = true;
      clearInterval(t);
    };
  }, [running, entry.id, router]);

  async function uploadFiles(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    for (const k of ['gcode', 'project'] as const) if (!(form.get(k) as File | null)?.size) form.delete(k);
    if (!form.getAll('photos').some((p) => (p as File).size)) form.delete('photos');
    setProgress(0);
    setMessage(null);
    const res = await uploadWithProgress<{ inspectionId: number | null }>(`/api/entries/${entry.id}/files`, form, setProgress);
    setProgress(null);
    if (res.status === 200) {
      setFileErrors({});
      setMessage({ tone: 'ok', text: res.body.inspectionId ? 'Uploaded. Inspecting the new G-code…' : 'Uploaded.' });
      (e.target as HTMLFormElement).reset();
      if (res.body.inspectionId) setInspection((i) => (i ? { ...i, status: 'queued' } : i));
      router.refresh();
    } else {
      setFileErrors(res.body.fields ?? {});
      setMessage({ tone: 'error', text: res.body.error ?? 'The upload failed; nothing was changed.' });
    }
  }

  async function act(path: string, ok: string, confirmText?: string) {
    if (confirmText && !window.confirm(confirmText)) return;
    setBusy(true);
    const res = await postJson(`/api/entries/${entry.id}/${path}`, {});
    setBusy(false);
    setMessage(res.status === 200 ? { tone: 'ok', text: ok } : { tone: 'error', text: res.body.error ?? 'That did not work.' });
    router.refresh();
  }

  return (
    <div className="space-y-6">
      <section className="card space-y-4" aria-labelledby="inspection-h">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h2 id="inspection-h">Inspection</h2>
          {entry.canEdit && inspection && !running && (
            <button type="button" className="btn-quiet" disabled={busy} onClick={() => act('inspect', 'Inspecting again…')}>Inspect again</button>
          )}
        </div>
        {inspection ? <InspectionReport inspection={inspection} limitMm3s={limitMm3s} /> : <p className="text-sm">No G-code uploaded yet.</p>}
      </section>

      {entry.canEdit && (
        <section className="card space-y-4" aria-labelledby="files-h">
          <h2 id="files-h">{entry.state === 'returned' ? 'Upload corrected files' : 'Replace files'}</h2>
          <form onSubmit={uploadFiles} className="grid gap-4 sm:grid-cols-3" noValidate aria-label="Upload new files">
            <div>
              <label htmlFor="r-gcode" className="label">New G-code</label>
              <input id="r-gcode" name="gcode" type="file" accept={GCODE_ACCEPT} aria-invalid={fileErrors.gcode ? true : undefined} aria-describedby={fileErrors.gcode ? 'r-gcode-error' : undefined} />
              {fileErrors.gcode && <p id="r-gcode-error" className="field-error" role="alert">{fileErrors.gcode}</p>}
            </div>
            <div>
              <label htmlFor="r-photos" className="label">New photos (replace all)</label>
              <input id="r-photos" name="photos" type="file" multiple accept={PHOTO_ACCEPT} aria-invalid={fileErrors.photos ? true : undefined} aria-describedby={fileErrors.photos ? 'r-photos-error' : undefined} />
              {fileErrors.photos && <p id="r-photos-error" className="field-error" role="alert">{fileErrors.photos}</p>}
            </div>
            <div>
              <label htmlFor="r-project" className="label">New project file</label>
              <input id="r-project" name="project" type="file" />
            </div>
            <div className="sm:col-span-3 space-y-2">
              <UploadBar fraction={progress} label="Uploading" />
              <button type="submit" className="btn-quiet" disabled={progress !== null}>Upload</button>
            </div>
          </form>
        </section>
      )}

      {message && <p role="status" data-testid="entry-message" className={message.tone === 'ok' ? 'text-sm text-coolant-700' : 'field-error'}>{message.text}</p>}

      <section className="flex flex-wrap items-start gap-3" aria-label="Entry actions">
        {entry.canSubmit && (
          <div className="space-y-2">
            <button type="button" className="btn-primary" disabled={busy || blockers.length > 0} aria-describedby={blockers.length ? 'submit-blockers' : undefined} onClick={() => act('submit', 'Entry submitted. A confirmation e-mail is on its way.')}>
              {entry.state === 'returned' ? 'Resubmit entry' : 'Submit entry'}
            </button>
            {blockers.length > 0 && (
              <ul id="submit-blockers" className="list-disc pl-5 text-sm text-ink-700" data-testid="submit-blockers">
                {blockers.map((b) => <li key={b}>{b}</li>)}
              </ul>
            )}
          </div>
        )}
        {entry.canWithdraw && (
          <button type="button" className="btn-quiet" disabled={busy} onClick={() => act('withdraw', 'Entry withdrawn.', 'Withdraw this entry? It will no longer count or be reviewed.')}>Withdraw entry</button>
        )}
      </section>
    </div>
  );
}
