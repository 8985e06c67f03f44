'use client';
/**
 * A form that posts its fields as JSON to a route handler and shows the answer: per-field messages
 * next to the fields, a general message above the button, or a success message in place.
 */
import { useState, type ReactNode } from 'react';
import { Field } from '@/components/forms/Field';

export interface FieldSpec {
  name: string;
  label: string;
  type?: string;
  autoComplete?: string;
  hint?: string;
}

export function JsonForm(props: {
  action: string;
  method?: 'POST' | 'PUT';
  fields: FieldSpec[];
  hidden?: Record<string, string>;
  submitLabel: string;
  footer?: ReactNode;
  successNote?: ReactNode;
}) {
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setErrors({});
    setMessage(null);
    const body = { ...Object.fromEntries(new FormData(e.currentTarget).entries()), ...props.hidden };
    try {
      const res = await fetch(props.action, {
        method: props.method ?? 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify(body),
      });
      const data = await res.json().catch(() => ({}));
      if (res.ok) setDone(data.message ?? 'Done.');
      else {
        setErrors(data.fields ?? {});
        setMessage(data.error ?? `The server answered ${res.status}.`);
      }
    } catch {
      setMessage('Could not reach Hotlap. Check your connection and try again.');
    } finally {
      setBusy(false);
    }
  }

  if (done)
    return (
      <div className="rounded-lg border border-coolant-500 bg-coolant-50 p-4 text-coolant-700" role="status">
        <p>{done}</p>
        {props.successNote}
      </div>
    );

  const hiddenErrors = Object.entries(errors).filter(([k]) => !props.fields.some((f) => f.name === k));
  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      {props.fields.map((f) => (
        <Field key={f.name} {...f} error={errors[f.name]} />
      ))}
      {(message || hiddenErrors.length > 0) && (
        <div className="rounded-lg border border-alarm-500 bg-alarm-50 p-3 text-sm text-alarm-700" role="alert" data-testid="form-error">
          {hiddenErrors.length > 0 ? hiddenErrors.map(([, v]) => <p key={v}>{v}</p>) : <p>{message}</p>}
        </div>
      )}
      <button type="submit" className="btn-primary w-full" disabled={busy}>
        {busy ? 'Working…' : props.submitLabel}
      </button>
      {props.footer}
    </form>
  );
}
