'use client';
/**
 * A labelled drop area for files (react-dropzone): drop files on it, click it, or focus it and
 * press Enter or Space to choose them. Lists what was chosen — name, size and, for photos, a
 * thumbnail made in the browser — before anything is uploaded, and refuses a wrong file at once
 * with a sentence next to the field (the previous choice is kept). The server checks every file
 * again by its content; its sentence shows in the same place (`error`).
 */
import { useEffect, useRef, useState } from 'react';
import { useDropzone } from 'react-dropzone';
import { formatBytes } from '@/lib/format';

export interface FileDropProps {
  /** id of the file input; the error is `${id}-error`, the hint `${id}-hint`. */
  id: string;
  label: string;
  hint?: React.ReactNode;
  /** The input's accept attribute (what the file picker offers); `check` decides. */
  accept?: string;
  multiple?: boolean;
  files: File[];
  onFiles: (files: File[]) => void;
  /** The sentence for a file that cannot be used here, or null. */
  check: (file: File) => string | null;
  /** The sentence when the total count is too high, or null. */
  countProblem?: (count: number) => string | null;
  /** An error from the form or the server, shown until the next choice. */
  error?: string;
  /** Show a thumbnail of image files. */
  thumbnails?: boolean;
  disabled?: boolean;
  testId?: string;
  /** What a dropped file is called in the prompt ("the G-code", "photos"). */
  what: string;
}

/** Browsers can draw these; HEIC gets a placeholder. */
const DRAWABLE = /^image\/(jpeg|png|webp|gif)$/i;

function Thumbnail({ file }: { file: File }) {
  const ref = useRef<HTMLImageElement>(null);
  // The object URL lives as long as this thumbnail (revoked on unmount or when the file changes).
  useEffect(() => {
    const url = URL.createObjectURL(file);
    if (ref.current) ref.current.src = url;
    return () => URL.revokeObjectURL(url);
  }, [file]);
  if (!DRAWABLE.test(file.type)) return <span className="flex h-16 w-16 shrink-0 items-center justify-center rounded bg-ink-100 text-xs text-ink-600">{file.name.split('.').pop()?.toUpperCase()}</span>;
  // A local blob: URL of a file not uploaded yet; next/image has nothing to optimize here.
  // eslint-disable-next-line @next/next/no-img-element
  return <img ref={ref} alt={`Preview of ${file.name}`} className="h-16 w-16 shrink-0 rounded object-cover" data-testid="file-thumbnail" />;
}

const sameFile = (a: File, b: File) => a.name === b.name && a.size === b.size && a.lastModified === b.lastModified;

export function FileDrop(props: FileDropProps) {
  const { id, label, hint, accept, multiple = false, files, onFiles, check, countProblem, error, thumbnails = false, disabled, testId, what } = props;
  const [problem, setProblem] = useState<string | null>(null);
  const [seenError, setSeenError] = useState(error);
  // A new error from the form or server replaces a sentence of ours (adjusting state to a prop).
  if (seenError !== error) {
    setSeenError(error);
    if (error) setProblem(null);
  }

  function take(dropped: File[]) {
    const sentences: string[] = [];
    const ok: File[] = [];
    for (const f of dropped) {
      const p = check(f);
      if (p) sentences.push(p);
      else ok.push(f);
    }
    if (!multiple && dropped.length > 1) {
      setProblem(`Add one file here; ${dropped.length} were chosen.`);
      return;
    }
    let next = multiple ? [...files, ...ok.filter((f) => !files.some((g) => sameFile(f, g)))] : ok.slice(0, 1);
    const tooMany = countProblem?.(next.length) ?? null;
    if (tooMany) {
      sentences.push(tooMany);
      next = files;
    }
    setProblem(sentences.length ? sentences.join(' ') : null);
    if (ok.length && !tooMany) onFiles(next);
  }

  const { getRootProps, getInputProps, isDragActive, isFocused } = useDropzone({
    multiple,
    disabled,
    onDrop: (accepted, rejected) => take([...accepted, ...rejected.map((r) => r.file)]),
  });

  const shown = problem ?? error ?? null;
  const describedBy = [hint ? `${id}-hint` : null, shown ? `${id}-error` : null].filter(Boolean).join(' ') || undefined;
  return (
    <div data-testid={testId}>
      <label htmlFor={id} className="label">{label}</label>
      {hint && <div id={`${id}-hint`} className="mb-1 text-xs text-ink-500">{hint}</div>}
      <div
        {...getRootProps({
          role: 'button',
          'aria-labelledby': `${id}-prompt`,
          'aria-describedby': describedBy,
          'aria-disabled': disabled || undefined,
          className: `cursor-pointer rounded-xl border-2 border-dashed p-4 text-center transition-colors ${
            isDragActive ? 'border-ember-500 bg-ember-50' : shown ? 'border-alarm-500' : isFocused ? 'border-ember-400' : 'border-ink-300'
          } ${disabled ? 'cursor-not-allowed opacity-60' : ''}`,
        })}
        data-drag-active={isDragActive || undefined}
        data-testid={testId ? `${testId}-area` : undefined}
      >
        {/* No aria-label (react-dropzone sets "file upload"): the <label> above names the input. */}
        <input {...getInputProps({ id, accept, 'aria-label': undefined, 'aria-invalid': shown ? true : undefined, 'aria-describedby': describedBy })} />
        <p id={`${id}-prompt`} className="text-sm font-semibold text-ink-700">{`Drop ${what} here, or click or press Enter to choose`}</p>
        {isDragActive && <p className="text-xs text-ember-800" aria-hidden="true">Release to add {what}</p>}
      </div>
      {shown && <p id={`${id}-error`} className="field-error" role="alert">{shown}</p>}
      {files.length > 0 && (
        <ul className="mt-2 space-y-2" aria-label={`Chosen: ${label}`} data-testid={testId ? `${testId}-list` : undefined}>
          {files.map((f, i) => (
            <li key={`${f.name}-${f.size}-${f.lastModified}`} className="flex items-center gap-3 rounded-lg bg-ink-50 p-2 text-sm">
              {thumbnails && <Thumbnail file={f} />}
              <span className="min-w-0 flex-1">
                <span className="block truncate font-semibold" data-testid="file-name">{f.name}</span>
                <span className="num block text-xs text-ink-600" data-testid="file-size">{formatBytes(f.size)}</span>
              </span>
              <button type="button" className="btn-quiet" disabled={disabled} aria-label={`Remove ${f.name}`} onClick={() => { setProblem(null); onFiles(files.filter((_, j) => j !== i)); }}>
                Remove
              </button>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
