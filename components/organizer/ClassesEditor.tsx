'use client';
/** Classes of a season: add, edit, reorder and remove, each checked with the shared schema. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { ClassInputSchema } from '@/lib/seasons/schemas';
import { eligibilityText } from '@/lib/seasons/eligibility';
import { MOTION_SYSTEMS, MOTION_SYSTEM_LABELS, MODIFICATION_CLASSES } from '@/lib/domain';
import { MATERIAL_FAMILIES, MATERIALS } from '@/lib/inspection/materials';
import type { ClassJson } from '@/lib/seasons/classes';
import { callApi, sendChecked } from '@/components/organizer/api';
import { CheckGroup, Outcome, Select, TextInput } from '@/components/organizer/controls';

type Draft = {
  name: string; slug: string; description: string; nozzleDiametersMm: string; nozzleMinMm: string;
  materialFamilies: string[]; motionSystems: string[]; buildVolumeMinMm: string; buildVolumeMaxMm: string; modification: string;
};

const EMPTY: Draft = { name: '', slug: '', description: '', nozzleDiametersMm: '', nozzleMinMm: '', materialFamilies: [], motionSystems: [], buildVolumeMinMm: '', buildVolumeMaxMm: '', modification: 'any' };
const slugify = (s: string) => s.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 64);

function draftOf(c: ClassJson): Draft {
  return {
    name: c.name, slug: c.slug, description: c.description, nozzleDiametersMm: c.nozzleDiametersMm.join(', '), nozzleMinMm: c.nozzleMinMm === null ? '' : String(c.nozzleMinMm),
    materialFamilies: c.materialFamilies, motionSystems: c.motionSystems, buildVolumeMinMm: c.buildVolumeMinMm === null ? '' : String(c.buildVolumeMinMm),
    buildVolumeMaxMm: c.buildVolumeMaxMm === null ? '' : String(c.buildVolumeMaxMm), modification: c.modification,
  };
}

function ClassForm({ seasonId, existing, onDone, prefix }: { seasonId: number; existing?: ClassJson; onDone: (message: string) => void; prefix: string }) {
  const [d, setD] = useState<Draft>(existing ? draftOf(existing) : EMPTY);
  const [slugTouched, setSlugTouched] = useState(!!existing);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = <K extends keyof Draft>(k: K) => (val: Draft[K]) => setD((cur) => ({ ...cur, [k]: val, ...(k === 'name' && !slugTouched ? { slug: slugify(String(val)) } : {}) }));

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setBusy(true);
    const res = await sendChecked(ClassInputSchema, d, existing ? `/api/organizer/seasons/${seasonId}/classes/${existing.id}` : `/api/organizer/seasons/${seasonId}/classes`, existing ? 'PUT' : 'POST');
    setBusy(false);
    setErrors(res.fields);
    if (!res.ok) {
      setError(res.error);
      return;
    }
    if (!existing) {
      setD(EMPTY);
      setSlugTouched(false);
    }
    onDone(res.data.message ?? 'Saved.');
  }

  const id = (k: string) => `${prefix}-${k}`;
  const nozzleErr = errors.nozzleDiametersMm ?? Object.entries(errors).find(([k]) => k.startsWith('nozzleDiametersMm.'))?.[1];
  return (
    <form onSubmit={save} noValidate className="space-y-3" aria-label={existing ? `Edit class ${existing.name}` : 'New class'}>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextInput id={id('name')} label="Class name" value={d.name} onChange={set('name')} error={errors.name} />
        <TextInput id={id('slug')} label="Class address name" value={d.slug} onChange={(x) => { setSlugTouched(true); set('slug')(x); }} error={errors.slug} />
        <TextInput id={id('nozzles')} label="Nozzle diameters (mm)" value={d.nozzleDiametersMm} onChange={set('nozzleDiametersMm')} error={nozzleErr} hint="Comma-separated, e.g. 0.4; empty = any." />
        <TextInput id={id('nozzleMin')} label="Or minimum nozzle (mm)" inputMode="decimal" value={d.nozzleMinMm} onChange={set('nozzleMinMm')} error={errors.nozzleMinMm} />
        <TextInput id={id('buildMin')} label="Longest build axis from (mm)" inputMode="decimal" value={d.buildVolumeMinMm} onChange={set('buildVolumeMinMm')} error={errors.buildVolumeMinMm} />
        <TextInput id={id('buildMax')} label="Longest build axis up to (mm)" inputMode="decimal" value={d.buildVolumeMaxMm} onChange={set('buildVolumeMaxMm')} error={errors.buildVolumeMaxMm} />
      </div>
      <TextInput id={id('description')} label="Class description" value={d.description} onChange={set('description')} error={errors.description} />
      <CheckGroup id={id('materials')} legend="Material families (none = any)" value={d.materialFamilies} onChange={set('materialFamilies')} error={errors.materialFamilies}
        options={MATERIAL_FAMILIES.map((m) => ({ value: m, label: MATERIALS[m].label }))} />
      <CheckGroup id={id('motion')} legend="Motion systems (none = any)" value={d.motionSystems} onChange={set('motionSystems')} error={errors.motionSystems}
        options={MOTION_SYSTEMS.map((m) => ({ value: m, label: MOTION_SYSTEM_LABELS[m] }))} />
      <Select id={id('modification')} label="Stock or modified" value={d.modification} onChange={set('modification')} error={errors.modification} className="max-w-xs"
        options={MODIFICATION_CLASSES.map((m) => ({ value: m, label: m === 'any' ? 'Any machine' : m === 'stock' ? 'Stock machines only' : 'Modified machines only' }))} />
      <Outcome error={error} />
      <button type="submit" className="btn-primary" disabled={busy}>{busy ? 'Saving…' : existing ? 'Save class' : 'Add class'}</button>
    </form>
  );
}

export function ClassesEditor({ seasonId, classes, frozen }: { seasonId: number; classes: ClassJson[]; frozen: string | null }) {
  const router = useRouter();
  const [editing, setEditing] = useState<number | null>(null);
  const [outcome, setOutcome] = useState<{ error?: string; message?: string }>({});
  const done = (message: string) => {
    setEditing(null);
    setOutcome({ message });
    router.refresh();
  };

  async function move(index: number, delta: number) {
    const ids = classes.map((c) => c.id);
    const j = index + delta;
    if (j < 0 || j >= ids.length) return;
    [ids[index], ids[j]] = [ids[j], ids[index]];
    const res = await callApi(`/api/organizer/seasons/${seasonId}/classes`, 'PUT', { classIds: ids });
    if (res.ok) done(res.data.message ?? 'Order saved.');
    else setOutcome({ error: res.data.error });
  }

  async function remove(c: ClassJson) {
    if (!window.confirm(`Remove the class ${c.name} and its own rules?`)) return;
    const res = await callApi(`/api/organizer/seasons/${seasonId}/classes/${c.id}`, 'DELETE');
    if (res.ok) done(res.data.message ?? 'Removed.');
    else setOutcome({ error: res.data.error });
  }

  return (
    <div className="space-y-5">
      {classes.length === 0 ? <p className="text-sm text-ink-600">No classes yet. The season cannot open without at least one.</p> : (
        <ol className="divide-y divide-ink-100" data-testid="class-list">
          {classes.map((c, i) => (
            <li key={c.id} className="py-3">
              <div className="flex flex-wrap items-start justify-between gap-3">
                <div>
                  <p className="font-semibold">{c.name} <span className="num text-xs text-ink-500">/{c.slug}</span></p>
                  <p className="text-sm text-ink-600">{eligibilityText(c)}</p>
                </div>
                {!frozen && (
                  <div className="flex gap-2">
                    <button type="button" className="btn-quiet px-2 py-1" onClick={() => move(i, -1)} disabled={i === 0} aria-label={`Move ${c.name} up`}>↑</button>
                    <button type="button" className="btn-quiet px-2 py-1" onClick={() => move(i, 1)} disabled={i === classes.length - 1} aria-label={`Move ${c.name} down`}>↓</button>
                    <button type="button" className="btn-quiet px-2 py-1" onClick={() => setEditing(editing === c.id ? null : c.id)}>{editing === c.id ? 'Close' : `Edit`}<span className="sr-only"> {c.name}</span></button>
                    <button type="button" className="btn-quiet px-2 py-1 text-alarm-700" onClick={() => remove(c)}>Remove<span className="sr-only"> {c.name}</span></button>
                  </div>
                )}
              </div>
              {editing === c.id && <div className="mt-3 rounded-lg border border-ink-200 p-4"><ClassForm seasonId={seasonId} existing={c} onDone={done} prefix={`class-${c.id}`} /></div>}
            </li>
          ))}
        </ol>
      )}
      <Outcome error={outcome.error} message={outcome.message} testId="classes" />
      {frozen ? <p className="text-sm text-ink-600">{frozen}</p> : (
        <section className="rounded-lg border border-ink-200 p-4" aria-labelledby="new-class-heading">
          <h3 id="new-class-heading" className="mb-3 font-semibold">Add a class</h3>
          <ClassForm seasonId={seasonId} onDone={done} prefix="new-class" />
        </section>
      )}
    </div>
  );
}
