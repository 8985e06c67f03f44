'use client';
/**
 * The live part of an entry page: polls the inspection while it runs (TanStack Query), shows the
 * report, uploads corrected files dropped or chosen in drop areas (with progress), and submits,
 * withdraws or re-inspects.
 */
import { useEffect, useState } from 'react';
import { useRouter } from 'next/navigation';
import { useQuery } from '@tanstack/react-query';
import type { EntryView } from '@/lib/entries';
import type { InspectionJson } from '@/lib/entries/inspection';
import { InspectionReport } from './InspectionReport';
import { postJson, uploadWithProgress } from './upload';
import { UploadBar } from './UploadBar';
import { GcodeDrop, PhotosDrop, ProjectDrop } from '@/components/forms/EntryFileDrops';
import { GCODE_MAX_BYTES, PROJECT_MAX_BYTES } from '@/lib/entries/fileLimits';

const POLL_MS = 1000;
const MB = 1024 * 1024;

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

  // While the inspection is queued or running, ask for its status every second.
  const poll = useQuery({
    queryKey: ['entry-inspection', entry.id],
    queryFn: async () => {
      const res = await fetch(`/api/entries/${entry.id}/inspection`, { cache: 'no-store' });
      if (!res.ok) throw new Error(`status ${res.status}`);
      return (await res.json()) as { inspection: InspectionJson | null; blockers: string[] };
    },
    enabled: running,
    refetchInterval: running ? POLL_MS : false,
    gcTime: 0,
  });
  // Adopt each new answer once (during render, like the prop above).
  const [seenPollAt, setSeenPollAt] = useState(0);
  const finished = (i: InspectionJson | null | undefined) => !!i && (i.status === 'done' || i.status === 'failed');
  if (poll.data && poll.dataUpdatedAt !== seenPollAt) {
    setSeenPollAt(poll.dataUpdatedAt);
    setInspection(poll.data.inspection);
    setBlockers(poll.data.blockers);
    if (finished(poll.data.inspection)) setMessage((msg) => (msg?.tone === 'ok' ? null : msg));
  }
  // Finished: refresh the server-rendered parts (history, details) too.
  const doneAt = poll.data && finished(poll.data.inspection) ? poll.dataUpdatedAt : 0;
  useEffect(() => {
    if (doneAt) router.refresh();
  }, [doneAt, router]);

  const [gcode, setGcode] = useState<File[]>([]);
  const [photos, setPhotos] = useState<File[]>([]);
  const [project, setProject] = useState<File[]>([]);

  async function uploadFiles(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    if (!gcode.length && !photos.length && !project.length) {
      setMessage({ tone: 'error', text: 'Add a G-code, photos or a project file to upload first.' });
      return;
    }
    const form = new FormData();
    if (gcode[0]) form.append('gcode', gcode[0]);
    for (const p of photos) form.append('photos', p);
    if (project[0]) form.append('project', project[0]);
    setProgress(0);
    setMessage(null);
    const res = await uploadWithProgress<{ inspectionId: number | null }>(`/api/entries/${entry.id}/files`, form, setProgress);
    setProgress(null);
    if (res.status === 200) {
      setFileErrors({});
      setMessage({ tone: 'ok', text: res.body.inspectionId ? 'Uploaded. Inspecting the new G-code…' : 'Uploaded.' });
      setGcode([]);
      setPhotos([]);
      setProject([]);
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
          <form onSubmit={uploadFiles} className="grid items-start gap-4 lg:grid-cols-3" noValidate aria-label="Upload new files">
            <GcodeDrop id="r-gcode" label="New G-code" hint={`Plain or gzipped (.gcode.gz), up to ${GCODE_MAX_BYTES / MB} MB; inspected at once.`} files={gcode} onFiles={setGcode} error={fileErrors.gcode} disabled={progress !== null} />
            <PhotosDrop id="r-photos" label="New photos (replace all)" files={photos} onFiles={setPhotos} error={fileErrors.photos} disabled={progress !== null} />
            <ProjectDrop id="r-project" label="New project file" hint={`Slicer settings or project, up to ${PROJECT_MAX_BYTES / MB} MB.`} files={project} onFiles={setProject} error={fileErrors.project} disabled={progress !== null} />
            <div className="space-y-2 lg:col-span-3">
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
