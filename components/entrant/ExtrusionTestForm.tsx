'use client';
/**
 * Record an extrusion-limit test: filament, sample length, reference mass and one weighed mass per
 * rate step. Shows the computed efficiencies, limit and speed ceilings as you type (same library
 * as the server, which recomputes and stores them).
 */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { MATERIAL_FAMILIES, MATERIALS } from '@/lib/inspection/materials';
import { computeExtrusionLimit, DEFAULT_THRESHOLD_PERCENT } from '@/lib/extrusion';
import { EfficiencyChart } from '@/components/charts/EfficiencyChart';
import { postJson } from './upload';

const num = (s: string) => (s.trim() === '' ? NaN : Number(s));

export function ExtrusionTestForm({ machineId }: { machineId: number }) {
  const router = useRouter();
  const [family, setFamily] = useState<(typeof MATERIAL_FAMILIES)[number]>('pla');
  const [materialName, setMaterialName] = useState('');
  const [diameter, setDiameter] = useState('1.75');
  const [length, setLength] = useState('100');
  const [reference, setReference] = useState('');
  const [threshold, setThreshold] = useState(String(DEFAULT_THRESHOLD_PERCENT));
  const [steps, setSteps] = useState<{ rate: string; mass: string }[]>([{ rate: '10', mass: '' }, { rate: '15', mass: '' }, { rate: '20', mass: '' }]);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);

  const parsedSteps = steps.filter((s) => s.rate && s.mass).map((s) => ({ rateMm3s: num(s.rate), massG: num(s.mass) })).filter((s) => s.rateMm3s > 0 && s.massG >= 0);
  // Cheap arithmetic: recomputed on every render, no memo needed.
  const preview =
    num(diameter) > 0 && num(length) > 0 && parsedSteps.length > 0
      ? computeExtrusionLimit({ materialFamily: family, filamentDiameterMm: num(diameter), sampleLengthMm: num(length), referenceMassG: num(reference) > 0 ? num(reference) : null, thresholdPercent: num(threshold) || DEFAULT_THRESHOLD_PERCENT, steps: parsedSteps })
      : null;

  async function onSubmit(e: React.FormEvent) {
    e.preventDefault();
    const body = {
      materialFamily: family, materialName, filamentDiameterMm: num(diameter), sampleLengthMm: num(length),
      ...(reference.trim() ? { referenceMassG: num(reference) } : {}),
      thresholdPercent: num(threshold), steps: parsedSteps,
    };
    const res = await postJson(`/api/entrant/machines/${machineId}/extrusion-tests`, body);
    if (res.status === 201) {
      setErrors({});
      setMessage('Extrusion-limit test recorded.');
      router.refresh();
    } else {
      setErrors(res.body.fields ?? {});
      setMessage(res.body.error ?? 'The test could not be saved.');
    }
  }

  const err = (k: string) => errors[k] && <p id={`x-${k}-error`} className="field-error" role="alert">{errors[k]}</p>;
  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate aria-label="Record an extrusion-limit test">
      <div className="grid gap-4 sm:grid-cols-3">
        <div>
          <label htmlFor="x-family" className="label">Material family</label>
          <select id="x-family" className="input" value={family} onChange={(e) => setFamily(e.target.value as typeof family)}>
            {MATERIAL_FAMILIES.map((f) => <option key={f} value={f}>{MATERIALS[f].label}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="x-name" className="label">Material name</label>
          <input id="x-name" className="input" value={materialName} onChange={(e) => setMaterialName(e.target.value)} />
        </div>
        <div>
          <label htmlFor="x-diameter" className="label">Filament diameter (mm)</label>
          <input id="x-diameter" className="input" type="number" step="0.01" value={diameter} onChange={(e) => setDiameter(e.target.value)} aria-invalid={errors.filamentDiameterMm ? true : undefined} aria-describedby={errors.filamentDiameterMm ? 'x-filamentDiameterMm-error' : undefined} />
          {err('filamentDiameterMm')}
        </div>
        <div>
          <label htmlFor="x-length" className="label">Sample length (mm)</label>
          <input id="x-length" className="input" type="number" value={length} onChange={(e) => setLength(e.target.value)} aria-invalid={errors.sampleLengthMm ? true : undefined} aria-describedby={errors.sampleLengthMm ? 'x-sampleLengthMm-error' : undefined} />
          {err('sampleLengthMm')}
        </div>
        <div>
          <label htmlFor="x-reference" className="label">Reference mass (g)</label>
          <input id="x-reference" className="input" type="number" step="0.001" value={reference} onChange={(e) => setReference(e.target.value)} aria-describedby="x-reference-hint" />
          <p id="x-reference-hint" className="mt-1 text-xs text-ink-500">Weigh an unextruded piece of the sample length. Empty: computed from diameter and density{preview ? ` (${preview.expectedMassG.toFixed(3)} g)` : ''}.</p>
          {err('referenceMassG')}
        </div>
        <div>
          <label htmlFor="x-threshold" className="label">Pass threshold (%)</label>
          <input id="x-threshold" className="input" type="number" value={threshold} onChange={(e) => setThreshold(e.target.value)} />
          {err('thresholdPercent')}
        </div>
      </div>
      <fieldset>
        <legend className="label">Rate steps: rate (mm³/s) and the mass of the extruded sample (g)</legend>
        <div className="space-y-2">
          {steps.map((s, i) => (
            <div key={i} className="flex items-center gap-2">
              <input aria-label={`Step ${i + 1} rate (mm³/s)`} className="input w-32" type="number" value={s.rate} onChange={(e) => setSteps((xs) => xs.map((x, j) => (j === i ? { ...x, rate: e.target.value } : x)))} />
              <input aria-label={`Step ${i + 1} mass (g)`} className="input w-32" type="number" step="0.001" value={s.mass} onChange={(e) => setSteps((xs) => xs.map((x, j) => (j === i ? { ...x, mass: e.target.value } : x)))} />
              {preview && preview.steps.find((p) => p.rateMm3s === num(s.rate) && p.massG === num(s.mass)) && (
                <span className="num text-sm">{preview.steps.find((p) => p.rateMm3s === num(s.rate))!.efficiencyPercent.toFixed(1)} %</span>
              )}
              <button type="button" className="btn-quiet" onClick={() => setSteps((xs) => xs.filter((_, j) => j !== i))} aria-label={`Remove step ${i + 1}`}>×</button>
            </div>
          ))}
        </div>
        <button type="button" className="btn-quiet mt-2" onClick={() => setSteps((xs) => [...xs, { rate: '', mass: '' }])}>Add a step</button>
        {err('steps')}
      </fieldset>
      {preview && (
        <div className="rounded-lg bg-ink-50 p-3 text-sm" data-testid="extrusion-preview">
          <p>Limit: <strong className="num">{preview.limitFlowMm3s === null ? 'no step passed' : `${preview.limitFlowMm3s} mm³/s`}</strong>{preview.nonMonotonic && ' — a faster step passed again after a failure; repeat the test to be sure.'}</p>
        </div>
      )}
      {message && <p role="status" className={Object.keys(errors).length ? 'field-error' : 'text-sm text-coolant-700'}>{message}</p>}
      <button type="submit" className="btn-primary">Record test</button>
    </form>
  );
}

export function ExtrusionTestResult({ test }: { test: { id: number; materialFamily: string; materialName: string; testedAt: string; thresholdPercent: number; limitFlowMm3s: number | null; nonMonotonic: boolean; referenceMassG: number; expectedMassG: number; steps: { rateMm3s: number; massG: number; efficiencyPercent: number; passes: boolean }[]; ceilings: { layerHeightMm: number; lineWidthMm: number; speedMms: number; flowSpeedMms: number; limitedBy: 'flow' | 'machine' }[] } }) {
  const widths = [...new Set(test.ceilings.map((c) => c.lineWidthMm))];
  const heights = [...new Set(test.ceilings.map((c) => c.layerHeightMm))];
  return (
    <article className="card space-y-3" data-testid="extrusion-test">
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h3 className="font-semibold">{MATERIALS[test.materialFamily as keyof typeof MATERIALS]?.label ?? test.materialFamily}{test.materialName ? ` · ${test.materialName}` : ''}</h3>
        <p className="text-sm">Limit <strong className="num" data-testid="extrusion-limit">{test.limitFlowMm3s === null ? 'none' : `${test.limitFlowMm3s} mm³/s`}</strong> at ≥ {test.thresholdPercent} %</p>
      </header>
      <div className="grid gap-4 lg:grid-cols-2">
        <EfficiencyChart steps={test.steps} thresholdPercent={test.thresholdPercent} limitMm3s={test.limitFlowMm3s} />
        <div className="space-y-3">
          <table className="table">
            <thead><tr><th>Rate mm³/s</th><th>Mass g</th><th>Efficiency</th></tr></thead>
            <tbody>{test.steps.map((s) => <tr key={s.rateMm3s}><td className="num">{s.rateMm3s}</td><td className="num">{s.massG.toFixed(3)}</td><td className={`num ${s.passes ? 'text-coolant-700' : 'text-alarm-700'}`}>{s.efficiencyPercent.toFixed(1)} %</td></tr>)}</tbody>
          </table>
          {test.ceilings.length > 0 && (
            <table className="table" data-testid="speed-ceilings">
              <caption className="mb-1 text-left text-sm font-semibold text-ink-700">Speed ceiling (mm/s) = limit ÷ (layer height × line width)</caption>
              <thead><tr><th>layer \ line</th>{widths.map((w) => <th key={w} className="num">{w} mm</th>)}</tr></thead>
              <tbody>{heights.map((h) => <tr key={h}><th className="num">{h} mm</th>{widths.map((w) => {
                const c = test.ceilings.find((x) => x.layerHeightMm === h && x.lineWidthMm === w)!;
                return <td key={w} className="num" data-limited-by={c.limitedBy} title={c.limitedBy === 'machine' ? `The flow allows ${Math.round(c.flowSpeedMms)} mm/s; the machine's speed limit is lower.` : undefined}>{Math.round(c.speedMms)}{c.limitedBy === 'machine' ? '*' : ''}</td>;
              })}</tr>)}</tbody>
            </table>
          )}
          {test.ceilings.some((c) => c.limitedBy === 'machine') && <p className="text-xs text-ink-600" data-testid="ceiling-machine-note">* capped at the speed limit in this machine&apos;s record: the flow would allow more, the machine does not move faster.</p>}
          {test.nonMonotonic && <p className="text-sm text-ember-800">A faster step passed again after a failure; the limit stops at the first failure.</p>}
        </div>
      </div>
      <p className="text-xs text-ink-500">Reference {test.referenceMassG.toFixed(3)} g (computed from diameter and density: {test.expectedMassG.toFixed(3)} g) · recorded {test.testedAt.slice(0, 10)}</p>
    </article>
  );
}
