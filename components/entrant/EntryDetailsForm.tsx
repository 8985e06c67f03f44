'use client';
/**
 * Edits the details of a draft or returned entry in place (PUT /api/entries/:id, the same schema as
 * the new-entry form and the handler, through react-hook-form). Saving re-inspects the current
 * G-code against the corrected claims; files and the inspection history stay as they are. The
 * server's field errors show next to the fields.
 */
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { EntryView } from '@/lib/entries';
import { formatDurationMs } from '@/lib/format';
import { postJson } from './upload';
import { EDITABLE_DETAIL_FIELDS, entryDetailsFormSchema } from '@/components/forms/entrySchemas';

type Field = (typeof EDITABLE_DETAIL_FIELDS)[number];
type Values = Record<Field, string>;

export function EntryDetailsForm({ entry }: { entry: EntryView }) {
  const router = useRouter();
  const [open, setOpen] = useState(false);
  const m = entry.measuredMm;
  const initial: Values = {
    claimedTime: formatDurationMs(entry.claimedTimeMs),
    evidenceUrl: entry.evidenceUrl ?? '',
    measuredXMm: m.x === null ? '' : String(m.x),
    measuredYMm: m.y === null ? '' : String(m.y),
    measuredZMm: m.z === null ? '' : String(m.z),
    materialName: entry.materialName ?? '',
    notes: entry.notes ?? '',
  };
  const schema = useMemo(() => entryDetailsFormSchema(entry.season.videoRequired), [entry.season.videoRequired]);
  const { register, handleSubmit, reset, setError, getValues, formState: { errors, isSubmitting } } = useForm<Values>({
    // The resolver's input type is the schema's (numbers as unknown); the form holds text, as inputs do.
    resolver: zodResolver(schema) as never,
    defaultValues: initial,
    reValidateMode: 'onChange',
  });
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const aria = (k: Field) => ({
    'aria-invalid': errors[k] ? true : undefined,
    'aria-describedby': errors[k] ? `d-${k}-error` : undefined,
  });
  const err = (k: Field) => (errors[k]?.message ? <p id={`d-${k}-error`} className="field-error" role="alert">{errors[k]?.message}</p> : null);

  // Sends the text as typed: the handler parses it with the same schema.
  const save = handleSubmit(async () => {
    setMessage(null);
    const typed = getValues();
    const res = await postJson<{ inspectionId: number | null }>(
      `/api/entries/${entry.id}`,
      { ...typed, seasonId: entry.season.id, classId: entry.class.id, machineId: entry.machine.id, materialFamily: entry.materialFamily, nozzleMm: entry.nozzleMm },
      'PUT',
    );
    if (res.status === 200) {
      setMessage({ tone: 'ok', text: 'Details saved. The G-code is inspected again against them…' });
      setOpen(false);
      reset(typed);
      router.refresh();
      return;
    }
    for (const [k, text] of Object.entries(res.body.fields ?? {}))
      if ((EDITABLE_DETAIL_FIELDS as readonly string[]).includes(k)) setError(k as Field, { type: 'server', message: text });
    setMessage({ tone: 'error', text: res.body.error ?? 'The details could not be saved; nothing was changed.' });
  });

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
              <input id="d-claimedTime" className="input num" {...register('claimedTime')} {...aria('claimedTime')} />
              {err('claimedTime')}
            </div>
            <div>
              <label htmlFor="d-evidenceUrl" className="label">Evidence video link{entry.season.videoRequired ? '' : ' (optional)'}</label>
              <input id="d-evidenceUrl" className="input" type="url" placeholder="https://" {...register('evidenceUrl')} {...aria('evidenceUrl')} />
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
                  <input id={`d-${k}`} className="input" type="number" step="0.01" {...register(k)} {...aria(k)} />
                  {err(k)}
                </div>
              );
            })}
          </fieldset>
          <div>
            <label htmlFor="d-materialName" className="label">Material name</label>
            <input id="d-materialName" className="input" {...register('materialName')} {...aria('materialName')} />
            {err('materialName')}
          </div>
          <div>
            <label htmlFor="d-notes" className="label">Notes for the judges</label>
            <textarea id="d-notes" className="input" rows={3} {...register('notes')} {...aria('notes')} />
            {err('notes')}
          </div>
          <div className="flex gap-3">
            <button type="submit" className="btn-primary" disabled={isSubmitting}>Save details</button>
            <button type="button" className="btn-quiet" disabled={isSubmitting} onClick={() => { setOpen(false); reset(); }}>Cancel</button>
          </div>
        </form>
      )}
    </section>
  );
}
