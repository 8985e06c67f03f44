'use client';
/**
 * Edits the details of a draft or returned entry in place (PUT /api/entries/:id, the same schema as
 * the new-entry form). Saving re-inspects the current G-code against the corrected claims; files
 * and the inspection history stay as they are.
 */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import type { EntryView } from '@/lib/entries';
import { formatDurationMs } from '@/lib/format';
import { postJson } from './upload';
import { CLAIMED_TIME_REQUIRED, EVIDENCE_LINK_REQUIRED } from '@/lib/entries/messages';

const FIELDS = ['claimedTime', 'evidenceUrl', 'measuredXMm', 'measuredYMm', 'measuredZMm', 'materialName', 'notes'] as const;
type Field = (typeof FIELDS)[number];

export function EntryDetailsForm({ entry }: { entry: EntryView }) {
  const router = useRouter();
  const [open, setOpen] = useState(false);
  const m = entry.measuredMm;
  const initial: Record<Field, string> = {
    claimedTime: formatDurationMs(entry.claimedTimeMs),
    evidenceUrl: entry.evidenceUrl ?? '',
    measuredXMm: m.x === null ? '' : String(m.x),
    measuredYMm: m.y === null ? '' : String(m.y),
    measuredZMm: m.z === null ? '' : String(m.z),
    materialName: entry.materialName ?? '',
    notes: entry.notes ?? '',
  };
  const [v, setV] = useState(initial);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (k: Field) => (e: React.ChangeEvent<HTMLInputElement | HTMLTextAreaElement>) => setV((x) => ({ ...x, [k]: e.target.value }));
  const aria = (k: string, hint?: string) => ({
    'aria-invalid': errors[k] ? true : undefined,
    'aria-describedby': [hint, errors[k] ? `d-${k}-error` : null].filter(Boolean).join(' ') || undefined,
  });
  const err = (k: string) => (errors[k] ? <p id={`d-${k}-error`} className="field-error" role="alert">{errors[k]}</p> : null);

  async function save(e: React.FormEvent) {
    e.preventDefault();
    const local: Record<string, string> = {};
    if (!v.claimedTime.trim()) local.claimedTime = CLAIMED_TIME_REQUIRED;
    if (entry.season.videoRequired && !v.evidenceUrl.trim()) local.evidenceUrl = EVIDENCE_LINK_REQUIRED;
    setErrors(local);
    if (Object.keys(local).length) return;
    setBusy(true);
    setMessage(null);
    const res = await postJson<{ inspectionId: number | null }>(
      `/api/entries/${entry.id}`,
      {
        ...v,
        seasonId: entry.season.id,
        classId: entry.class.id,
        machineId: entry.machine.id,
        materialFamily: entry.materialFamily,
        nozzleMm: entry.nozzleMm,
      },
      'PUT',
    );
    setBusy(false);
    if (res.status === 200) {
      setMessage({ tone: 'ok', text: 'Details saved. The G-code is inspected again against them…' });
      setOpen(false);
      router.refresh();
    } else {
      setErrors(res.body.fields ?? {});
      setMessage({ tone: 'error', text: res.body.error ?? 'The details could not be saved; nothing was changed.' });
    }
  }

  return (
    <section className="card space-y-4" aria-labelledby="edit-details-h">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="edit-details-h">Edit details</h2>
        {!open && <button type="button" className="btn-quiet" onClick={() => setOpen(true)}>Edit details</button>}
      </div>
      {message && <p role="status" data-testid="details-message" className={message.tone === 'ok' ? 'text-sm text-coolant-700' : 'field-error'}>{message.text}</p>}
      {open && (
        <form onSubmit={save} noValidate className="space-y-4" aria-label="Entry details">
          <div className="grid gap-4 sm:grid-cols-2">
            <div>
              <label htmlFor="d-claimedTime" className="label">Claimed time (h:mm:ss.t)</label>
              <input id="d-claimedTime" className="input num" value={v.claimedTime} onChange={set('claimedTime')} {...aria('claimedTime')} />
              {err('claimedTime')}
            </div>
            <div>
              <label htmlFor="d-evidenceUrl" className="label">Evidence video link{entry.season.videoRequired ? '' : ' (optional)'}</label>
              <input id="d-evidenceUrl" className="input" type="url" placeholder="https://" value={v.evidenceUrl} onChange={set('evidenceUrl')} {...aria('evidenceUrl')} />
              {err('evidenceUrl')}
            </div>
          </div>
          <fieldset className="grid gap-4 sm:grid-cols-3">
            <legend className="label">Measured dimensions of the printed piece (mm)</legend>
            {(['X', 'Y', 'Z'] as const).map((a) => {
              const k = `measured${a}Mm` as Field;
              return (
                <div key={a}>
                  <label htmlFor={`d-${k}`} className="label">{a} (mm)</label>
                  <input id={`d-${k}`} className="input" type="number" step="0.01" value={v[k]} onChange={set(k)} {...aria(k)} />
                  {err(k)}
                </div>
              );
            })}
          </fieldset>
          <div>
            <label htmlFor="d-materialName" className="label">Material name</label>
            <input id="d-materialName" className="input" value={v.materialName} onChange={set('materialName')} {...aria('materialName')} />
            {err('materialName')}
          </div>
          <div>
            <label htmlFor="d-notes" className="label">Notes for the judges</label>
            <textarea id="d-notes" className="input" rows={3} value={v.notes} onChange={set('notes')} {...aria('notes')} />
            {err('notes')}
          </div>
          <div className="flex gap-3">
            <button type="submit" className="btn-primary" disabled={busy}>Save details</button>
            <button type="button" className="btn-quiet" disabled={busy} onClick={() => { setOpen(false); setV(initial); setErrors({}); }}>Cancel</button>
          </div>
        </form>
      )}
    </section>
  );
}
