'use client';
/**
 * The rulebook check in the visitor's browser: the file is read where it is (a Web Worker streams
 * it through the same engine the server runs, /engine/gcode-check.js) and checked against the
 * season's effective rules; nothing is uploaded. Used by the public check page (with a drop zone)
 * and by the new-entry form (given the file the entrant chose, while the upload runs).
 */
import { useEffect, useMemo, useState } from 'react';
import { useDropzone } from 'react-dropzone';
import { InspectionReport } from '@/components/entrant/InspectionReport';
import { UploadBar } from '@/components/entrant/UploadBar';
import { reportInspectionJson } from '@/lib/entries/inspectionView';
import { CHECK_WORKER_URL, type CheckMessage, type CheckRequest } from '@/lib/check/protocol';
import type { CheckRulebook } from '@/lib/check/rulebook';
import type { InspectionReport as ReportContract } from '@/lib/inspection/contract';
import { formatNumber } from '@/lib/format';

type State =
  | { phase: 'idle' }
  | { phase: 'reading'; bytesRead: number; totalBytes: number }
  | { phase: 'done'; report: ReportContract; elapsedMs: number; at: Date }
  | { phase: 'error'; message: string };

interface Props {
  seasonSlug: string;
  /** The season's rules (the public page embeds them); fetched from the public route otherwise. */
  rulebook?: CheckRulebook;
  /** The class whose rules apply; undefined: the visitor picks one. */
  classId?: number | null;
  /** The file to check; undefined: the visitor drops one here. */
  file?: File | null;
}

const MB = 1024 * 1024;

function useRulebook(seasonSlug: string, given?: CheckRulebook): { rulebook: CheckRulebook | null; error: string | null } {
  const [fetched, setFetched] = useState<{ slug: string; rulebook: CheckRulebook | null; error: string | null } | null>(null);
  useEffect(() => {
    if (given) return;
    let live = true;
    fetch(`/api/v1/seasons/${encodeURIComponent(seasonSlug)}/check-rules`)
      .then(async (res) => {
        const body = await res.json();
        if (live) setFetched(res.ok ? { slug: seasonSlug, rulebook: body as CheckRulebook, error: null } : { slug: seasonSlug, rulebook: null, error: (body as { error?: string }).error ?? 'The rulebook could not be loaded.' });
      })
      .catch(() => live && setFetched({ slug: seasonSlug, rulebook: null, error: 'The rulebook could not be loaded; check your connection and choose the file again.' }));
    return () => {
      live = false;
    };
  }, [seasonSlug, given]);
  if (given) return { rulebook: given, error: null };
  if (!fetched || fetched.slug !== seasonSlug) return { rulebook: null, error: null };
  return { rulebook: fetched.rulebook, error: fetched.error };
}

export function GcodeCheck({ seasonSlug, rulebook: given, classId, file: givenFile }: Props) {
  const { rulebook, error: rulebookError } = useRulebook(seasonSlug, given);
  const [pickedClass, setPickedClass] = useState<number | null>(null);
  const [dropped, setDropped] = useState<File | null>(null);
  const [state, setState] = useState<State>({ phase: 'idle' });
  const file = givenFile === undefined ? dropped : givenFile;
  const effectiveClass = classId === undefined ? (pickedClass ?? rulebook?.classes[0]?.id ?? null) : classId;
  const rules = useMemo(() => {
    if (!rulebook) return null;
    return rulebook.classes.find((c) => c.id === effectiveClass)?.rules ?? rulebook.seasonRules;
  }, [rulebook, effectiveClass]);

  useEffect(() => {
    if (!file || !rules || !rulebook) return;
    const worker = new Worker(CHECK_WORKER_URL);
    // Reset for the new file from the worker's first message on (no synchronous state change here).
    worker.onmessage = (e: MessageEvent<CheckMessage>) => {
      const m = e.data;
      if (m.type === 'progress') setState({ phase: 'reading', bytesRead: m.bytesRead, totalBytes: m.totalBytes });
      else if (m.type === 'done') setState({ phase: 'done', report: m.report, elapsedMs: m.elapsedMs, at: new Date() });
      else setState({ phase: 'error', message: m.message });
      if (m.type !== 'progress') worker.terminate();
    };
    worker.onerror = () => setState({ phase: 'error', message: 'This browser could not run the check (Web Workers blocked?); the server still inspects your upload.' });
    const req: CheckRequest = { file, name: file.name, options: { rules, ruleContext: rulebook.ruleContext } };
    worker.postMessage(req);
    return () => worker.terminate();
  }, [file, rules, rulebook]);

  const { getRootProps, getInputProps, isDragActive } = useDropzone({
    multiple: false,
    disabled: givenFile !== undefined,
    onDrop: (files) => {
      if (files[0]) setDropped(files[0]);
    },
  });

  const view = state.phase === 'done' ? reportInspectionJson(state.report, state.at) : null;
  return (
    <section className="space-y-4" data-testid="gcode-check" data-phase={state.phase} aria-live="polite">
      {givenFile === undefined && (
        <div className="space-y-3">
          {rulebook && rulebook.classes.length > 0 && classId === undefined && (
            <div>
              <label htmlFor="check-class" className="label">Class</label>
              <select id="check-class" className="input" value={effectiveClass ?? ''} onChange={(e) => setPickedClass(Number(e.target.value))}>
                {rulebook.classes.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
              </select>
            </div>
          )}
          <div {...getRootProps({ className: `rounded-xl border-2 border-dashed p-8 text-center ${isDragActive ? 'border-ember-500 bg-ember-50' : 'border-ink-300'}` })}>
            <input {...getInputProps({ 'aria-label': 'G-code file to check' })} data-testid="check-file" />
            <p className="font-semibold">Drop a .gcode or .gcode.gz here, or click to choose one</p>
            <p className="text-sm text-ink-600">It is read in this browser and never leaves your computer.</p>
          </div>
        </div>
      )}
      {rulebookError && <p className="field-error" role="alert">{rulebookError}</p>}
      {state.phase === 'reading' && <UploadBar fraction={state.totalBytes ? state.bytesRead / state.totalBytes : 0} label={`Checking ${file?.name ?? 'the file'} in this browser (${formatNumber(state.bytesRead / MB, 1)} of ${formatNumber(state.totalBytes / MB, 1)} MB)`} />}
      {state.phase === 'error' && <p className="field-error" role="alert" data-testid="check-error">{state.message}</p>}
      {view && state.phase === 'done' && (
        <div className="space-y-3" data-testid="check-result">
          <p className="text-sm text-ink-600" data-testid="check-note">
            Checked in this browser in <span className="num" data-testid="check-elapsed" data-ms={Math.round(state.elapsedMs)}>{formatNumber(state.elapsedMs / 1000, 2, 's')}</span>, against{' '}
            {rulebook?.classes.find((c) => c.id === effectiveClass)?.name ?? 'the season'}&apos;s rules; nothing was uploaded. This is a preview: the organizers&apos; inspection of an uploaded entry is the one that counts.
          </p>
          <InspectionReport inspection={view} audience="public" />
        </div>
      )}
    </section>
  );
}
