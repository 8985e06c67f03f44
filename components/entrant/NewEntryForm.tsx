'use client';
/**
 * The multi-step entry form: class and machine → the timed print → files. The last step uploads
 * everything in one request (with progress); the server creates the draft only when every check
 * passes, then the inspection starts and the entry page shows it.
 */
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import Link from 'next/link';
import { MATERIAL_FAMILIES, MATERIALS, materialCaution } from '@/lib/inspection/materials';
import type { entryFormOptions } from '@/lib/entries';
import { uploadWithProgress } from './upload';
import { GcodeCheck } from '@/components/GcodeCheck';
import { UploadBar } from './UploadBar';
import { CLAIMED_TIME_REQUIRED, EVIDENCE_LINK_REQUIRED } from '@/lib/entries/messages';

type Options = Awaited<ReturnType<typeof entryFormOptions>>;

const STEPS = ['Class and machine', 'Your timed print', 'Files'] as const;
const STEP_OF_FIELD: Record<string, number> = {
  seasonId: 0, classId: 0, machineId: 0, materialFamily: 0, materialName: 0, nozzleMm: 0,
  claimedTime: 1, evidenceUrl: 1, measuredXMm: 1, measuredYMm: 1, measuredZMm: 1, notes: 1,
  gcode: 2, photos: 2, project: 2,
};
export const GCODE_ACCEPT = '.gcode,.gco,.g,.gz,text/plain,application/gzip,application/x-gzip';
export const PHOTO_ACCEPT = 'image/jpeg,image/png,image/webp,image/heic,image/heif,.heic,.heif';

function FieldError({ id, error }: { id: string; error?: string }) {
  return error ? <p id={`${id}-error`} className="field-error" role="alert">{error}</p> : null;
}

export function NewEntryForm({ options, seasonId }: { options: Options; seasonId?: number }) {
  const router = useRouter();
  const [step, setStep] = useState(0);
  const [season, setSeason] = useState<number>(seasonId ?? options.seasons[0]?.id ?? 0);
  const [machine, setMachine] = useState<number>(options.machines[0]?.id ?? 0);
  const s = options.seasons.find((x) => x.id === season);
  const m = options.machines.find((x) => x.id === machine);
  const eligible = useMemo(() => (s?.classes ?? []).filter((c) => (c.ineligible[machine] ?? []).length === 0), [s, machine]);
  const [cls, setCls] = useState<number>(0);
  const classId = eligible.some((c) => c.id === cls) ? cls : (eligible[0]?.id ?? 0);
  const [v, setV] = useState({ materialFamily: 'pla', materialName: '', nozzleMm: '', claimedTime: '', evidenceUrl: '', measuredXMm: '', measuredYMm: '', measuredZMm: '', notes: '' });
  const set = (k: keyof typeof v) => (e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement>) => setV((x) => ({ ...x, [k]: e.target.value }));
  const [gcode, setGcode] = useState<File | null>(null);
  const [photos, setPhotos] = useState<File[]>([]);
  const [project, setProject] = useState<File | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const nozzle = v.nozzleMm || String(m?.nozzleMm ?? '');

  if (!s) return <p>No season is open for entries right now.</p>;
  if (!m) return <p>Register a machine first: <Link href="/me/machines">Machines</Link>.</p>;
  const chosen = s.classes.find((c) => c.id === classId);
  const full = !!chosen && chosen.entriesUsed >= s.entryLimit;

  const aria = (name: string) => ({ 'aria-invalid': errors[name] ? true : undefined, 'aria-describedby': errors[name] ? `e-${name}-error` : undefined });

  function next(e: React.FormEvent) {
    e.preventDefault();
    const local: Record<string, string> = {};
    if (step === 0 && !classId) local.classId = 'This machine is not eligible for any class of this season.';
    if (step === 0 && full) local.classId = `You have used all ${s!.entryLimit} entries of ${chosen!.name}; withdraw a draft to make room, or choose another class.`;
    if (step === 1 && !v.claimedTime.trim()) local.claimedTime = CLAIMED_TIME_REQUIRED;
    if (step === 1 && s!.videoRequired && !v.evidenceUrl.trim()) local.evidenceUrl = EVIDENCE_LINK_REQUIRED;
    else if (step === 1 && v.evidenceUrl.trim() && !/^https?:\/\/\S+$/i.test(v.evidenceUrl.trim())) local.evidenceUrl = 'The evidence link must start with http:// or https://.';
    if (step === 2 && !gcode) local.gcode = 'Add the G-code (.gcode or .gcode.gz).';
    setErrors(local);
    if (Object.keys(local).length) return;
    if (step < 2) setStep(step + 1);
    else void upload();
  }

  async function upload() {
    const form = new FormData();
    const fields: Record<string, string> = { ...v, nozzleMm: nozzle, seasonId: String(season), classId: String(classId), machineId: String(machine) };
    for (const [k, val] of Object.entries(fields)) form.append(k, val);
    form.append('gcode', gcode!);
    for (const p of photos) form.append('photos', p);
    if (project) form.append('project', project);
    setMessage(null);
    setProgress(0);
    const res = await uploadWithProgress<{ id: number }>('/api/entries', form, setProgress);
    if (res.status === 201) {
      router.push(`/me/entries/${res.body.id}`);
      return;
    }
    setProgress(null);
    const f = res.body.fields ?? {};
    setErrors(f);
    setMessage(res.body.error ?? 'The entry could not be saved.');
    const first = Object.keys(f).map((k) => STEP_OF_FIELD[k]).filter((x) => x !== undefined);
    if (first.length) setStep(Math.min(...first));
  }

  const caution = materialCaution(v.materialFamily as (typeof MATERIAL_FAMILIES)[number]);
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
              <select id="e-seasonId" className="input" value={season} onChange={(e) => setSeason(Number(e.target.value))}>
                {options.seasons.map((x) => <option key={x.id} value={x.id}>{x.name}</option>)}
              </select>
            </div>
          )}
          <div>
            <label htmlFor="e-machineId" className="label">Machine</label>
            <select id="e-machineId" className="input" value={machine} onChange={(e) => setMachine(Number(e.target.value))} {...aria('machineId')}>
              {options.machines.map((x) => <option key={x.id} value={x.id}>{x.name} ({x.nozzleMm} mm)</option>)}
            </select>
            <FieldError id="e-machineId" error={errors.machineId} />
          </div>
          <div>
            <label htmlFor="e-classId" className="label">Class</label>
            <select id="e-classId" className="input" value={classId} onChange={(e) => setCls(Number(e.target.value))} {...aria('classId')}>
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
            <FieldError id="e-classId" error={errors.classId} />
          </div>
          <div className="grid gap-4 sm:grid-cols-3">
            <div>
              <label htmlFor="e-materialFamily" className="label">Material family</label>
              <select id="e-materialFamily" className="input" value={v.materialFamily} onChange={set('materialFamily')} {...aria('materialFamily')}>
                {MATERIAL_FAMILIES.map((f) => <option key={f} value={f}>{MATERIALS[f].label}</option>)}
              </select>
              <FieldError id="e-materialFamily" error={errors.materialFamily} />
            </div>
            <div>
              <label htmlFor="e-materialName" className="label">Material name</label>
              <input id="e-materialName" className="input" value={v.materialName} onChange={set('materialName')} {...aria('materialName')} />
            </div>
            <div>
              <label htmlFor="e-nozzleMm" className="label">Nozzle (mm)</label>
              <input id="e-nozzleMm" className="input" type="number" step="0.05" value={nozzle} onChange={set('nozzleMm')} {...aria('nozzleMm')} />
              <FieldError id="e-nozzleMm" error={errors.nozzleMm} />
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
            <input id="e-claimedTime" className="input num" placeholder="0:24:31.4" value={v.claimedTime} onChange={set('claimedTime')} aria-invalid={errors.claimedTime ? true : undefined} aria-describedby={`e-claimedTime-hint${errors.claimedTime ? ' e-claimedTime-error' : ''}`} />
            <p id="e-claimedTime-hint" className="mt-1 text-xs text-ink-500">Timing: {s.timingConvention}.</p>
            <FieldError id="e-claimedTime" error={errors.claimedTime} />
          </div>
          <div>
            <label htmlFor="e-evidenceUrl" className="label">Evidence video link{s.videoRequired ? '' : ' (optional)'}</label>
            <input id="e-evidenceUrl" className="input" type="url" placeholder="https://" value={v.evidenceUrl} onChange={set('evidenceUrl')} {...aria('evidenceUrl')} />
            <FieldError id="e-evidenceUrl" error={errors.evidenceUrl} />
          </div>
          <fieldset className="grid gap-4 sm:grid-cols-3">
            <legend className="label">Measured dimensions of the printed piece (mm){s.testPieceSizeMm ? ` — the test piece is ${s.testPieceSizeMm.x} × ${s.testPieceSizeMm.y} × ${s.testPieceSizeMm.z} mm` : ''}</legend>
            {(['X', 'Y', 'Z'] as const).map((a) => {
              const k = `measured${a}Mm` as 'measuredXMm';
              return (
                <div key={a}>
                  <label htmlFor={`e-${k}`} className="label">{a} (mm)</label>
                  <input id={`e-${k}`} className="input" type="number" step="0.01" value={v[k]} onChange={set(k)} {...aria(k)} />
                  <FieldError id={`e-${k}`} error={errors[k]} />
                </div>
              );
            })}
          </fieldset>
          <div>
            <label htmlFor="e-notes" className="label">Notes for the judges</label>
            <textarea id="e-notes" className="input" rows={3} value={v.notes} onChange={set('notes')} />
          </div>
        </fieldset>
      )}

      {step === 2 && (
        <fieldset className="space-y-4">
          <legend className="sr-only">Files</legend>
          <div>
            <label htmlFor="e-gcode" className="label">G-code (.gcode or .gcode.gz, up to 200 MB)</label>
            <input id="e-gcode" type="file" accept={GCODE_ACCEPT} onChange={(e) => setGcode(e.target.files?.[0] ?? null)} {...aria('gcode')} />
            <FieldError id="e-gcode" error={errors.gcode} />
            {/* The same check in this browser: the verdict shows before the upload finishes. */}
            <GcodeCheck seasonSlug={s.slug} classId={classId} file={gcode} />
          </div>
          <div>
            <label htmlFor="e-photos" className="label">Photos ({s.photosRequired} required: JPEG, PNG, WebP or HEIC)</label>
            {s.photoKinds.length > 0 && <p className="text-xs text-ink-500">Show: {s.photoKinds.join('; ')}.</p>}
            <input id="e-photos" type="file" multiple accept={PHOTO_ACCEPT} onChange={(e) => setPhotos([...(e.target.files ?? [])])} {...aria('photos')} />
            <p className="mt-1 text-xs text-ink-500">Location data is removed from photos before anyone else sees them; the capture time is kept for the judges.</p>
            <FieldError id="e-photos" error={errors.photos} />
          </div>
          <div>
            <label htmlFor="e-project" className="label">Slicer settings or project file (optional)</label>
            <input id="e-project" type="file" onChange={(e) => setProject(e.target.files?.[0] ?? null)} {...aria('project')} />
            <FieldError id="e-project" error={errors.project} />
          </div>
          <UploadBar fraction={progress} label="Uploading" />
        </fieldset>
      )}

      {message && <p className="field-error" role="alert" data-testid="form-error">{message}</p>}
      <div className="flex gap-3">
        {step > 0 && <button type="button" className="btn-quiet" onClick={() => setStep(step - 1)} disabled={progress !== null}>Back</button>}
        <button type="submit" className="btn-primary" disabled={progress !== null || !!s.windowProblem}>{step < 2 ? 'Next' : 'Upload and inspect'}</button>
      </div>
    </form>
  );
}
