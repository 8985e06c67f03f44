'use client';
/**
 * The multi-step entry form: class and machine → the timed print → files. Fields go through
 * react-hook-form with the server's own zod schema (EntryDetailsSchema), so each step shows the
 * same sentences the server would before moving on. Files are dropped or chosen in drop areas that
 * list names, sizes and photo thumbnails; the last step uploads everything in one request (with
 * progress) while the browser checks the G-code against the rulebook. The server creates the draft
 * only when every check passes; its field errors show next to the fields.
 */
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import Link from 'next/link';
import { useForm, useWatch, type FieldPath } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { MATERIAL_FAMILIES, MATERIALS, materialCaution } from '@/lib/inspection/materials';
import type { entryFormOptions } from '@/lib/entries';
import { EntryDetailsSchema } from '@/lib/entries/schema';
import { uploadWithProgress } from './upload';
import { GcodeCheck } from '@/components/GcodeCheck';
import { GcodeDrop, PhotosDrop, ProjectDrop } from '@/components/forms/EntryFileDrops';
import { UploadBar } from './UploadBar';
import { entryFormSchema } from '@/components/forms/entrySchemas';

type Options = Awaited<ReturnType<typeof entryFormOptions>>;

const STEPS = ['Class and machine', 'Your timed print', 'Files'] as const;
const STEP_FIELDS = [
  ['seasonId', 'classId', 'machineId', 'materialFamily', 'materialName', 'nozzleMm'],
  ['claimedTime', 'evidenceUrl', 'measuredXMm', 'measuredYMm', 'measuredZMm', 'notes'],
] as const;
const FILE_FIELDS = ['gcode', 'photos', 'project'] as const;
type FileField = (typeof FILE_FIELDS)[number];

type FormInput = z.input<typeof EntryDetailsSchema>;
type Values = { [K in keyof FormInput]-?: string };

function FieldError({ id, error }: { id: string; error?: string }) {
  return error ? <p id={`${id}-error`} className="field-error" role="alert">{error}</p> : null;
}

export function NewEntryForm({ options, seasonId }: { options: Options; seasonId?: number }) {
  const router = useRouter();
  const [step, setStep] = useState(0);
  const firstSeason = options.seasons.find((x) => x.id === seasonId) ?? options.seasons[0];
  const firstMachine = options.machines[0];
  const [videoRequired, setVideoRequired] = useState(!!firstSeason?.videoRequired);
  const schema = useMemo(() => entryFormSchema(videoRequired), [videoRequired]);
  const form = useForm<Values>({
    // The resolver's input type is the schema's (ids as unknown); the form holds text, as inputs do.
    resolver: zodResolver(schema) as never,
    mode: 'onSubmit',
    reValidateMode: 'onChange',
    defaultValues: {
      seasonId: String(firstSeason?.id ?? ''), classId: '', machineId: String(firstMachine?.id ?? ''),
      materialFamily: 'pla', materialName: '', nozzleMm: String(firstMachine?.nozzleMm ?? ''),
      claimedTime: '', evidenceUrl: '', measuredXMm: '', measuredYMm: '', measuredZMm: '', notes: '',
    },
  });
  const { register, control, setValue, trigger, setError, getValues, formState: { errors } } = form;
  const [seasonText, machineText, classText, materialFamily] = useWatch({ control, name: ['seasonId', 'machineId', 'classId', 'materialFamily'] });
  const season = Number(seasonText);
  const machine = Number(machineText);
  const cls = Number(classText);
  const s = options.seasons.find((x) => x.id === season);
  const m = options.machines.find((x) => x.id === machine);
  const eligible = useMemo(() => (s?.classes ?? []).filter((c) => (c.ineligible[machine] ?? []).length === 0), [s, machine]);
  const classId = eligible.some((c) => c.id === cls) ? cls : (eligible[0]?.id ?? 0);
  const [gcode, setGcode] = useState<File[]>([]);
  const [photos, setPhotos] = useState<File[]>([]);
  const [project, setProject] = useState<File[]>([]);
  const [fileErrors, setFileErrors] = useState<Partial<Record<FileField, string>>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [progress, setProgress] = useState<number | null>(null);

  if (!s) return <p>No season is open for entries right now.</p>;
  if (!m) return <p>Register a machine first: <Link href="/me/machines">Machines</Link>.</p>;
  const chosen = s.classes.find((c) => c.id === classId);
  const full = !!chosen && chosen.entriesUsed >= s.entryLimit;

  const err = (name: FieldPath<Values>) => errors[name]?.message;
  const aria = (name: FieldPath<Values>) => ({ 'aria-invalid': err(name) ? true : undefined, 'aria-describedby': err(name) ? `e-${name}-error` : undefined });

  async function next(e: React.FormEvent) {
    e.preventDefault();
    setMessage(null);
    // The class shown is the one that counts (the first eligible one when the stored choice is not).
    setValue('classId', classId ? String(classId) : '');
    if (step === 0 && !classId) return setError('classId', { type: 'eligibility', message: 'This machine is not eligible for any class of this season.' }, { shouldFocus: true });
    if (step === 0 && full) return setError('classId', { type: 'limit', message: `You have used all ${s!.entryLimit} entries of ${chosen!.name}; withdraw a draft to make room, or choose another class.` }, { shouldFocus: true });
    if (step < 2) {
      if (await trigger([...STEP_FIELDS[step]], { shouldFocus: true })) setStep(step + 1);
      return;
    }
    if (!gcode[0]) {
      setFileErrors((f) => ({ ...f, gcode: 'Add the G-code (.gcode or .gcode.gz).' }));
      return;
    }
    // Every field once more (a value could have been changed on an earlier step).
    if (!(await trigger())) {
      const bad = STEP_FIELDS.findIndex((names) => names.some((n) => form.getFieldState(n).invalid));
      if (bad >= 0) setStep(bad);
      return;
    }
    void upload();
  }

  async function upload() {
    const data = new FormData();
    const fields: Record<string, string> = { ...getValues(), classId: String(classId) };
    for (const [k, val] of Object.entries(fields)) data.append(k, val);
    data.append('gcode', gcode[0]);
    for (const p of photos) data.append('photos', p);
    if (project[0]) data.append('project', project[0]);
    setProgress(0);
    setFileErrors({});
    const res = await uploadWithProgress<{ id: number }>('/api/entries', data, setProgress);
    if (res.status === 201) {
      router.push(`/me/entries/${res.body.id}`);
      return;
    }
    setProgress(null);
    const f = res.body.fields ?? {};
    const files: Partial<Record<FileField, string>> = {};
    let firstStep: number | null = null;
    for (const [k, text] of Object.entries(f)) {
      if ((FILE_FIELDS as readonly string[]).includes(k)) {
        files[k as FileField] = text;
        firstStep = Math.min(firstStep ?? 2, 2);
        continue;
      }
      const at = STEP_FIELDS.findIndex((names) => (names as readonly string[]).includes(k));
      if (at < 0) continue;
      setError(k as FieldPath<Values>, { type: 'server', message: text });
      firstStep = Math.min(firstStep ?? at, at);
    }
    setFileErrors(files);
    setMessage(res.body.error ?? 'The entry could not be saved.');
    if (firstStep !== null) setStep(firstStep);
  }

  const caution = materialCaution(materialFamily as (typeof MATERIAL_FAMILIES)[number]);
  return (
    <form onSubmit={next} noValidate className="space-y-6" aria-label="New entry">
      <ol className="flex flex-wrap gap-2 text-sm" aria-label="Steps">
        {STEPS.map((label, i) => (
          <li key={label} aria-current={i === step ? 'step' : undefined} className={`pill ${i === step ? 'bg-ember-600 text-white' : i < step ? 'bg-coolant-100 text-coolant-700' : 'bg-ink-100 text-ink-600'}`}>
            {i + 1}. {label}
          </li>
        ))}
      </ol>

      {s.windowProblem && <p className="rounded-lg bg-ember-50 p-3 text-sm text-ember-800" role="status" data-testid="window-problem">{s.windowProblem}</p>}
      {step === 0 && (
        <fieldset className="space-y-4">
          <legend className="sr-only">Class and machine</legend>
          {options.seasons.length > 1 && (
            <div>
              <label htmlFor="e-seasonId" className="label">Season</label>
              <select id="e-seasonId" className="input" {...register('seasonId', { onChange: (e) => setVideoRequired(!!options.seasons.find((x) => x.id === Number(e.target.value))?.videoRequired) })}>
                {options.seasons.map((x) => <option key={x.id} value={x.id}>{x.name}</option>)}
              </select>
            </div>
          )}
          <div>
            <label htmlFor="e-machineId" className="label">Machine</label>
            <select id="e-machineId" className="input" {...register('machineId', { onChange: (e) => setValue('nozzleMm', String(options.machines.find((x) => x.id === Number(e.target.value))?.nozzleMm ?? '')) })} {...aria('machineId')}>
              {options.machines.map((x) => <option key={x.id} value={x.id}>{x.name} ({x.nozzleMm} mm)</option>)}
            </select>
            <FieldError id="e-machineId" error={err('machineId')} />
          </div>
          <div>
            <label htmlFor="e-classId" className="label">Class</label>
            <select id="e-classId" className="input" {...register('classId')} value={classId || ''} {...aria('classId')}>
              {s.classes.map((c) => (
                <option key={c.id} value={c.id} disabled={(c.ineligible[machine] ?? []).length > 0}>
                  {c.name}{(c.ineligible[machine] ?? []).length ? ' — not eligible' : ''}
                </option>
              ))}
            </select>
            {chosen && (
              <p className="mt-1 text-sm" data-testid="entry-limit">
                Entries in {chosen.name}: {chosen.entriesUsed} of {s.entryLimit} used{full ? ' — the limit is reached.' : '.'}
              </p>
            )}
            <ul className="mt-1 text-xs text-ink-500">
              {s.classes.filter((c) => (c.ineligible[machine] ?? []).length).map((c) => <li key={c.id}>{c.name}: {c.ineligible[machine][0]}</li>)}
            </ul>
            <FieldError id="e-classId" error={err('classId')} />
          </div>
          <div className="grid gap-4 sm:grid-cols-3">
            <div>
              <label htmlFor="e-materialFamily" className="label">Material family</label>
              <select id="e-materialFamily" className="input" {...register('materialFamily')} {...aria('materialFamily')}>
                {MATERIAL_FAMILIES.map((f) => <option key={f} value={f}>{MATERIALS[f].label}</option>)}
              </select>
              <FieldError id="e-materialFamily" error={err('materialFamily')} />
            </div>
            <div>
              <label htmlFor="e-materialName" className="label">Material name</label>
              <input id="e-materialName" className="input" {...register('materialName')} {...aria('materialName')} />
              <FieldError id="e-materialName" error={err('materialName')} />
            </div>
            <div>
              <label htmlFor="e-nozzleMm" className="label">Nozzle (mm)</label>
              <input id="e-nozzleMm" className="input" type="number" step="0.05" {...register('nozzleMm')} {...aria('nozzleMm')} />
              <FieldError id="e-nozzleMm" error={err('nozzleMm')} />
            </div>
          </div>
          {caution && <p className="rounded-lg bg-ember-50 p-3 text-sm text-ember-800">{caution}</p>}
        </fieldset>
      )}

      {step === 1 && (
        <fieldset className="space-y-4">
          <legend className="sr-only">Your timed print</legend>
          <div>
            <label htmlFor="e-claimedTime" className="label">Claimed time (h:mm:ss.t)</label>
            <input id="e-claimedTime" className="input num" placeholder="0:24:31.4" {...register('claimedTime')} aria-invalid={err('claimedTime') ? true : undefined} aria-describedby={`e-claimedTime-hint${err('claimedTime') ? ' e-claimedTime-error' : ''}`} />
            <p id="e-claimedTime-hint" className="mt-1 text-xs text-ink-500">Timing: {s.timingConvention}.</p>
            <FieldError id="e-claimedTime" error={err('claimedTime')} />
          </div>
          <div>
            <label htmlFor="e-evidenceUrl" className="label">Evidence video link{s.videoRequired ? '' : ' (optional)'}</label>
            <input id="e-evidenceUrl" className="input" type="url" placeholder="https://" {...register('evidenceUrl')} {...aria('evidenceUrl')} />
            <FieldError id="e-evidenceUrl" error={err('evidenceUrl')} />
          </div>
          <fieldset className="grid gap-4 sm:grid-cols-3">
            <legend className="label">Measured dimensions of the printed piece (mm){s.testPieceSizeMm ? ` — the test piece is ${s.testPieceSizeMm.x} × ${s.testPieceSizeMm.y} × ${s.testPieceSizeMm.z} mm` : ''}</legend>
            {(['X', 'Y', 'Z'] as const).map((a) => {
              const k = `measured${a}Mm` as 'measuredXMm';
              return (
                <div key={a}>
                  <label htmlFor={`e-${k}`} className="label">{a} (mm)</label>
                  <input id={`e-${k}`} className="input" type="number" step="0.01" {...register(k)} {...aria(k)} />
                  <FieldError id={`e-${k}`} error={err(k)} />
                </div>
              );
            })}
          </fieldset>
          <div>
            <label htmlFor="e-notes" className="label">Notes for the judges</label>
            <textarea id="e-notes" className="input" rows={3} {...register('notes')} {...aria('notes')} />
            <FieldError id="e-notes" error={err('notes')} />
          </div>
        </fieldset>
      )}

      {step === 2 && (
        <fieldset className="space-y-4">
          <legend className="sr-only">Files</legend>
          <GcodeDrop id="e-gcode" files={gcode} onFiles={(f) => { setGcode(f); setFileErrors((x) => ({ ...x, gcode: undefined })); }} error={fileErrors.gcode} disabled={progress !== null} />
          <PhotosDrop
            id="e-photos"
            label={`Photos (${s.photosRequired} required: JPEG, PNG, WebP or HEIC)`}
            files={photos}
            onFiles={(f) => { setPhotos(f); setFileErrors((x) => ({ ...x, photos: undefined })); }}
            error={fileErrors.photos}
            disabled={progress !== null}
            hint={<>{s.photoKinds.length > 0 && <>Show: {s.photoKinds.join('; ')}. </>}Location data is removed from photos before anyone else sees them; the capture time is kept for the judges.</>}
          />
          <ProjectDrop id="e-project" files={project} onFiles={(f) => { setProject(f); setFileErrors((x) => ({ ...x, project: undefined })); }} error={fileErrors.project} disabled={progress !== null} />
          <UploadBar fraction={progress} label="Uploading" />
        </fieldset>
      )}

      {message && <p className="field-error" role="alert" data-testid="form-error">{message}</p>}
      <div className="flex gap-3">
        {step > 0 && <button type="button" className="btn-quiet" onClick={() => setStep(step - 1)} disabled={progress !== null}>Back</button>}
        <button type="submit" className="btn-primary" disabled={progress !== null || !!s.windowProblem}>{step < 2 ? 'Next' : 'Upload and inspect'}</button>
      </div>
      {/* After the buttons, so the long report does not push them off a phone's screen. */}
      {step === 2 && gcode[0] && (
        <section className="space-y-2 border-t border-ink-100 pt-4" aria-labelledby="e-check-h">
          <h2 id="e-check-h" className="text-base font-semibold">Rulebook check of {gcode[0].name} in this browser</h2>
          {/* The same check in this browser: the verdict shows before the upload finishes. */}
          <GcodeCheck seasonSlug={s.slug} classId={classId} file={gcode[0]} />
        </section>
      )}
    </form>
  );
}
