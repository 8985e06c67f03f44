'use client';
/** Season editor: the same zod schema checks the fields here and again on the server. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { SeasonInputSchema, TIMING_CONVENTIONS, type SeasonInput } from '@/lib/seasons/schemas';
import { Markdown } from '@/components/organizer/Markdown';
import { sendChecked } from '@/components/organizer/api';
import { Check, Outcome, Select, TextArea, TextInput } from '@/components/organizer/controls';

/** The IANA zone names this browser knows, for the time-zone suggestions. */
function timeZoneNames(): string[] {
  try {
    return (Intl as unknown as { supportedValuesOf?: (k: string) => string[] }).supportedValuesOf?.('timeZone') ?? [];
  } catch {
    return [];
  }
}

const slugify = (s: string) => s.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 64);

export function SeasonForm({ seasonId, initial, locked }: { seasonId?: number; initial: SeasonInput; locked?: string | null }) {
  const router = useRouter();
  const [v, setV] = useState({
    ...initial,
    photosRequired: String(initial.photosRequired),
    entryLimit: String(initial.entryLimit),
    verificationsRequired: String(initial.verificationsRequired),
    photoKinds: initial.photoKinds.join('\n'),
  });
  const [slugTouched, setSlugTouched] = useState(!!seasonId);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [outcome, setOutcome] = useState<{ error?: string; message?: string }>({});
  const [busy, setBusy] = useState(false);
  const [zones] = useState(timeZoneNames);
  const set = (k: keyof typeof v) => (val: string | boolean) =>
    setV((cur) => {
      const next = { ...cur, [k]: val };
      if (k === 'name' && !slugTouched) next.slug = slugify(String(val));
      return next;
    });

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setOutcome({});
    const raw = {
      ...v,
      photosRequired: Number(v.photosRequired),
      entryLimit: Number(v.entryLimit),
      verificationsRequired: Number(v.verificationsRequired),
      photoKinds: v.photoKinds.split('\n').map((s) => s.trim()).filter(Boolean),
    };
    setBusy(true);
    const res = await sendChecked(SeasonInputSchema, raw, seasonId ? `/api/organizer/seasons/${seasonId}` : '/api/organizer/seasons', seasonId ? 'PUT' : 'POST');
    setBusy(false);
    setErrors(res.fields);
    if (!res.ok) {
      setOutcome({ error: res.error ?? undefined });
      return;
    }
    if (!seasonId) {
      router.push(`/organize/seasons/${(res.data.season as { id: number }).id}`);
      return;
    }
    setOutcome({ message: res.data.message });
    router.refresh();
  }

  const f = (id: string) => `season-${id}`;
  return (
    <form onSubmit={save} noValidate className="space-y-4" aria-label="Season settings">
      {locked && <p className="text-sm text-ink-600">{locked}</p>}
      <div className="grid gap-4 sm:grid-cols-2">
        <TextInput id={f('name')} label="Season name" value={v.name} onChange={set('name')} error={errors.name} />
        <TextInput id={f('slug')} label="Address name" value={v.slug} onChange={(x) => { setSlugTouched(true); set('slug')(x); }} error={errors.slug} hint={`Public page: /seasons/${v.slug || '…'}`} />
        <TextInput id={f('hostName')} label="Hosted by" value={v.hostName} onChange={set('hostName')} error={errors.hostName} hint="The club or group running the season." />
        <TextInput id={f('timeZone')} label="Time zone" value={v.timeZone} onChange={set('timeZone')} error={errors.timeZone} list="season-zones" hint="IANA name; the dates below are wall-clock times in this zone." />
        <TextInput id={f('opensAt')} label="Opens" type="datetime-local" value={v.opensAt} onChange={set('opensAt')} error={errors.opensAt} />
        <TextInput id={f('closesAt')} label="Closes" type="datetime-local" value={v.closesAt} onChange={set('closesAt')} error={errors.closesAt} />
      </div>
      <datalist id="season-zones">{zones.map((z) => <option key={z} value={z} />)}</datalist>
      <div className="grid gap-4 lg:grid-cols-2">
        <TextArea id={f('description')} label="Description (Markdown)" rows={8} value={v.description} onChange={set('description')} error={errors.description}
          hint="# heading, **bold**, *italic*, - lists, [links](https://…). HTML is shown as text." />
        <div>
          <p className="label">Preview</p>
          <div className="min-h-24 rounded-lg border border-ink-200 bg-ink-50 p-3 text-sm"><Markdown source={v.description} /></div>
        </div>
      </div>
      <TextInput id={f('timingConvention')} label="Timing convention" value={v.timingConvention} onChange={set('timingConvention')} error={errors.timingConvention} list="season-timings" hint="What the entrant’s clock measures." />
      <datalist id="season-timings">{TIMING_CONVENTIONS.map((t) => <option key={t} value={t} />)}</datalist>
      <div className="grid gap-4 sm:grid-cols-3">
        <TextInput id={f('photosRequired')} label="Photos required" inputMode="numeric" value={v.photosRequired} onChange={set('photosRequired')} error={errors.photosRequired} />
        <TextInput id={f('entryLimit')} label="Entries per entrant and class" inputMode="numeric" value={v.entryLimit} onChange={set('entryLimit')} error={errors.entryLimit} />
        <Select id={f('verificationsRequired')} label="Verifying judges per entry" value={v.verificationsRequired} onChange={set('verificationsRequired')} error={errors.verificationsRequired}
          options={[{ value: '1', label: 'One judge' }, { value: '2', label: 'Two judges' }]} />
      </div>
      <TextArea id={f('photoKinds')} label="What the photos must show (one per line)" rows={3} value={v.photoKinds} onChange={set('photoKinds')} error={errors.photoKinds ?? errors['photoKinds.0']} />
      <Check id={f('videoRequired')} label="A video link of the whole print is required" checked={v.videoRequired} onChange={set('videoRequired')} />
      <Outcome error={outcome.error} message={outcome.message} testId="season-form" />
      <button type="submit" className="btn-primary" disabled={busy || !!locked}>{busy ? 'Saving…' : seasonId ? 'Save settings' : 'Create season'}</button>
    </form>
  );
}
