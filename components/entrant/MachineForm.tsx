'use client';
/** Register or edit a machine. The server validates with MachineSchema and answers field errors. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { MOTION_SYSTEMS, MOTION_SYSTEM_LABELS } from '@/lib/domain';
import type { MachineJson } from '@/lib/machines';
import { postJson } from './upload';

type Values = Record<string, string | boolean>;

function Input({ name, label, values, errors, set, type = 'text', hint, step }: { name: string; label: string; values: Values; errors: Record<string, string>; set: (k: string, v: string) => void; type?: string; hint?: string; step?: string }) {
  const id = `m-${name}`;
  const described = [hint ? `${id}-hint` : '', errors[name] ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <div>
      <label htmlFor={id} className="label">{label}</label>
      <input id={id} name={name} type={type} step={step} className="input" value={String(values[name] ?? '')} onChange={(e) => set(name, e.target.value)} aria-invalid={errors[name] ? true : undefined} aria-describedby={described} />
      {hint && <p id={`${id}-hint`} className="mt-1 text-xs text-ink-500">{hint}</p>}
      {errors[name] && <p id={`${id}-error`} className="field-error" role="alert">{errors[name]}</p>}
    </div>
  );
}

export function MachineForm({ machine }: { machine?: MachineJson }) {
  const router = useRouter();
  const [values, setValues] = useState<Values>(() => ({
    name: machine?.name ?? '', motionSystem: machine?.motionSystem ?? 'corexy',
    buildXMm: String(machine?.buildXMm ?? ''), buildYMm: String(machine?.buildYMm ?? ''), buildZMm: String(machine?.buildZMm ?? ''),
    nozzleMm: String(machine?.nozzleMm ?? '0.4'), hotend: machine?.hotend ?? '', extruder: machine?.extruder ?? '', firmware: machine?.firmware ?? '',
    maxAccelMmS2: machine?.maxAccelMmS2 == null ? '' : String(machine.maxAccelMmS2), maxSpeedMms: machine?.maxSpeedMms == null ? '' : String(machine.maxSpeedMms),
    modifications: machine?.modifications ?? '', isModified: machine?.isModified ?? false,
  }));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (k: string, v: string | boolean) => setValues((s) => ({ ...s, [k]: v }));

  async function onSubmit(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setMessage(null);
    const res = await postJson<MachineJson>(machine ? `/api/entrant/machines/${machine.id}` : '/api/entrant/machines', values, machine ? 'PUT' : 'POST');
    setBusy(false);
    if (res.status >= 200 && res.status < 300) {
      setErrors({});
      if (machine) {
        setMessage('Machine saved.');
        router.refresh();
      } else router.push(`/me/machines/${res.body.id}`);
      return;
    }
    setErrors(res.body.fields ?? {});
    setMessage(res.body.error ?? 'The machine could not be saved.');
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate aria-label={machine ? 'Edit machine' : 'Register a machine'}>
      <div className="grid gap-4 sm:grid-cols-2">
        <Input name="name" label="Name" values={values} errors={errors} set={set} />
        <div>
          <label htmlFor="m-motionSystem" className="label">Motion system</label>
          <select id="m-motionSystem" className="input" value={String(values.motionSystem)} onChange={(e) => set('motionSystem', e.target.value)}>
            {MOTION_SYSTEMS.map((m) => <option key={m} value={m}>{MOTION_SYSTEM_LABELS[m]}</option>)}
          </select>
        </div>
      </div>
      <fieldset className="grid gap-4 sm:grid-cols-4">
        <legend className="label">Build volume and nozzle</legend>
        <Input name="buildXMm" label="Build X (mm)" type="number" values={values} errors={errors} set={set} />
        <Input name="buildYMm" label="Build Y (mm)" type="number" values={values} errors={errors} set={set} />
        <Input name="buildZMm" label="Build Z (mm)" type="number" values={values} errors={errors} set={set} />
        <Input name="nozzleMm" label="Nozzle (mm)" type="number" step="0.05" values={values} errors={errors} set={set} />
      </fieldset>
      <div className="grid gap-4 sm:grid-cols-3">
        <Input name="hotend" label="Hotend" values={values} errors={errors} set={set} />
        <Input name="extruder" label="Extruder" values={values} errors={errors} set={set} />
        <Input name="firmware" label="Firmware" values={values} errors={errors} set={set} />
      </div>
      <div className="grid gap-4 sm:grid-cols-2">
        <Input name="maxAccelMmS2" label="Acceleration limit (mm/s²)" type="number" values={values} errors={errors} set={set} hint="As set in the firmware; optional." />
        <Input name="maxSpeedMms" label="Speed limit (mm/s)" type="number" values={values} errors={errors} set={set} hint="Optional." />
      </div>
      <div>
        <label htmlFor="m-modifications" className="label">Modifications</label>
        <textarea id="m-modifications" className="input" rows={3} value={String(values.modifications)} onChange={(e) => set('modifications', e.target.value)} />
      </div>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" checked={!!values.isModified} onChange={(e) => set('isModified', e.target.checked)} /> This machine is modified from stock
      </label>
      {message && <p role="status" className={Object.keys(errors).length ? 'field-error' : 'text-sm text-coolant-700'}>{message}</p>}
      <button type="submit" className="btn-primary" disabled={busy}>{machine ? 'Save machine' : 'Register machine'}</button>
    </form>
  );
}

export function RetireButton({ machine }: { machine: MachineJson }) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  return (
    <button
      type="button"
      className="btn-quiet"
      disabled={busy}
      onClick={async () => {
        setBusy(true);
        await postJson(`/api/entrant/machines/${machine.id}`, { retired: !machine.retiredAt }, 'PATCH');
        setBusy(false);
        router.refresh();
      }}
    >
      {machine.retiredAt ? 'Bring back into service' : 'Retire machine'}
    </button>
  );
}
