/** A labelled input whose error message is tied to it for screen readers (aria-describedby). */
export function Field(props: {
  name: string;
  label: string;
  type?: string;
  error?: string;
  hint?: string;
  autoComplete?: string;
  defaultValue?: string;
  required?: boolean;
}) {
  const { name, label, type = 'text', error, hint, autoComplete, defaultValue, required } = props;
  const id = `f-${name}`;
  const described = [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <div>
      <label htmlFor={id} className="label">{label}</label>
      <input
        id={id}
        name={name}
        type={type}
        className="input"
        autoComplete={autoComplete}
        defaultValue={defaultValue}
        required={required}
        aria-invalid={error ? true : undefined}
        aria-describedby={described}
      />
      {hint && <p id={`${id}-hint`} className="mt-1 text-xs text-ink-500">{hint}</p>}
      {error && <p id={`${id}-error`} className="field-error" role="alert">{error}</p>}
    </div>
  );
}
