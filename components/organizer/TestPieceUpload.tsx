'use client';
/** Upload of the season's test piece STL; the server measures it and answers with its dimensions. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { callApi } from '@/components/organizer/api';
import { Outcome } from '@/components/organizer/controls';

export interface TestPieceView {
  name: string;
  format: string;
  triangleCount: number;
  sizeXMm: number;
  sizeYMm: number;
  sizeZMm: number;
  volumeMm3: number;
}

export function TestPieceSummary({ tp }: { tp: TestPieceView }) {
  return (
    <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4" data-testid="test-piece">
      <dt className="text-ink-500">Name</dt><dd>{tp.name}</dd>
      <dt className="text-ink-500">Size X × Y × Z</dt><dd className="num">{tp.sizeXMm.toFixed(2)} × {tp.sizeYMm.toFixed(2)} × {tp.sizeZMm.toFixed(2)} mm</dd>
      <dt className="text-ink-500">Volume</dt><dd className="num">{(tp.volumeMm3 / 1000).toFixed(3)} cm³</dd>
      <dt className="text-ink-500">Triangles</dt><dd className="num">{tp.triangleCount} ({tp.format} STL)</dd>
    </dl>
  );
}

export function TestPieceUpload({ seasonId, current, locked }: { seasonId: number; current: TestPieceView | null; locked: string | null }) {
  const router = useRouter();
  const [outcome, setOutcome] = useState<{ error?: string; message?: string }>({});
  const [fieldError, setFieldError] = useState<string | undefined>();
  const [busy, setBusy] = useState(false);

  async function upload(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setOutcome({});
    setFieldError(undefined);
    const form = new FormData(e.currentTarget);
    const file = form.get('file');
    if (!(file instanceof File) || file.size === 0) {
      setFieldError('Choose an STL file (ASCII or binary).');
      return;
    }
    setBusy(true);
    const res = await callApi(`/api/organizer/seasons/${seasonId}/test-piece`, 'POST', form);
    setBusy(false);
    if (!res.ok) {
      setFieldError(res.data.fields?.file);
      setOutcome({ error: res.data.error ?? `The server answered ${res.status}.` });
      return;
    }
    setOutcome({ message: res.data.message });
    (e.target as HTMLFormElement).reset();
    router.refresh();
  }

  return (
    <div className="space-y-4">
      {current ? <TestPieceSummary tp={current} /> : <p className="text-sm text-ink-600">No test piece yet. The season cannot open without one.</p>}
      {locked ? <p className="text-sm text-ink-600">{locked}</p> : (
        <form onSubmit={upload} className="flex flex-wrap items-end gap-4" noValidate aria-label="Test piece upload">
          <div>
            <label htmlFor="tp-name" className="label">Test piece name</label>
            <input id="tp-name" name="name" className="input" placeholder={current?.name ?? 'Beacon'} />
          </div>
          <div>
            <label htmlFor="tp-file" className="label">STL file</label>
            <input id="tp-file" name="file" type="file" accept=".stl,model/stl,application/sla" className="text-sm"
              aria-invalid={fieldError ? true : undefined} aria-describedby={fieldError ? 'tp-file-error' : undefined} />
            {fieldError && <p id="tp-file-error" className="field-error" role="alert">{fieldError}</p>}
          </div>
          <button type="submit" className="btn-primary" disabled={busy}>{busy ? 'Measuring…' : current ? 'Replace test piece' : 'Upload test piece'}</button>
        </form>
      )}
      <Outcome error={outcome.error} message={outcome.message} testId="test-piece" />
    </div>
  );
}
