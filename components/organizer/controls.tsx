'use client';
/**
 * Form controls that follow components/forms/Field: the label is tied to the control, and an error
 * is tied to it with aria-describedby so screen readers read it with the field.
 */
import type { ReactNode } from 'react';

function describedBy(id: string, hint?: string, error?: string) {
  return [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
}

function Help({ id, hint, error }: { id: string; hint?: string; error?: string }) {
  return (
    <>
      {hint && <p id={`${id}-hint`} className="mt-1 text-xs text-ink-500">{hint}</p>}
      {error && <p id={`${id}-error`} className="field-error" role="alert">{error}</p>}
    </>
  );
}

interface Base {
  id: string;
  label: string;
  error?: string;
  hint?: string;
  className?: string;
}

export function TextInput(props: Base & { value: string; onChange: (v: string) => void; type?: string; inputMode?: 'decimal' | 'numeric' | 'text' | 'email'; list?: string; placeholder?: string }) {
  const { id, label, error, hint } = props;
  return (
    <div className={props.className}>
      <label htmlFor={id} className="label">{label}</label>
      <input id={id} type={props.type ?? 'text'} className="input" value={props.value} inputMode={props.inputMode} list={props.list} placeholder={props.placeholder}
        onChange={(e) => props.onChange(e.target.value)} aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, hint, error)} />
      <Help id={id} hint={hint} error={error} />
    </div>
  );
}

export function TextArea(props: Base & { value: string; onChange: (v: string) => void; rows?: number }) {
  const { id, label, error, hint } = props;
  return (
    <div className={props.className}>
      <label htmlFor={id} className="label">{label}</label>
      <textarea id={id} className="input font-mono text-sm" rows={props.rows ?? 5} value={props.value}
        onChange={(e) => props.onChange(e.target.value)} aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, hint, error)} />
      <Help id={id} hint={hint} error={error} />
    </div>
  );
}

export function Select(props: Base & { value: string; onChange: (v: string) => void; options: { value: string; label: string }[] }) {
  const { id, label, error, hint } = props;
  return (
    <div className={props.className}>
      <label htmlFor={id} className="label">{label}</label>
      <select id={id} className="input" value={props.value} onChange={(e) => props.onChange(e.target.value)}
        aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, hint, error)}>
        {props.options.map((o) => <option key={o.value} value={o.value}>{o.label}</option>)}
      </select>
      <Help id={id} hint={hint} error={error} />
    </div>
  );
}

export function Check(props: { id: string; label: ReactNode; checked: boolean; onChange: (v: boolean) => void; className?: string }) {
  return (
    <label htmlFor={props.id} className={`flex items-center gap-2 text-sm ${props.className ?? ''}`}>
      <input id={props.id} type="checkbox" checked={props.checked} onChange={(e) => props.onChange(e.target.checked)} />
      {props.label}
    </label>
  );
}

export function CheckGroup(props: { id: string; legend: string; options: { value: string; label: string }[]; value: string[]; onChange: (v: string[]) => void; error?: string; hint?: string }) {
  return (
    <fieldset aria-describedby={describedBy(props.id, props.hint, props.error)}>
      <legend className="label">{props.legend}</legend>
      <div className="flex flex-wrap gap-3">
        {props.options.map((o) => (
          <Check key={o.value} id={`${props.id}-${o.value}`} label={o.label} checked={props.value.includes(o.value)}
            onChange={(on) => props.onChange(on ? [...props.value, o.value] : props.value.filter((x) => x !== o.value))} />
        ))}
      </div>
      <Help id={props.id} hint={props.hint} error={props.error} />
    </fieldset>
  );
}

/** The answer of the last action: a general error (with any field messages that have no field on screen) or a success note. */
export function Outcome({ error, message, testId }: { error?: string | null; message?: string | null; testId?: string }) {
  if (error)
    return <div className="rounded-lg border border-alarm-500 bg-alarm-50 p-3 text-sm text-alarm-700" role="alert" data-testid={testId ? `${testId}-error` : 'form-error'}>{error}</div>;
  if (message)
    return <div className="rounded-lg border border-coolant-500 bg-coolant-50 p-3 text-sm text-coolant-700" role="status" data-testid={testId ? `${testId}-status` : undefined}>{message}</div>;
  return null;
}
