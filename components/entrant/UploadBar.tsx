/** An accessible progress bar for uploads. */
export function UploadBar({ fraction, label = 'Upload' }: { fraction: number | null; label?: string }) {
  if (fraction === null) return null;
  const pct = Math.round(fraction * 100);
  return (
    <div className="space-y-1" data-testid="upload-progress">
      <div className="flex justify-between text-xs text-ink-600"><span>{label}</span><span className="num">{pct} %</span></div>
      <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} className="h-2 w-full overflow-hidden rounded bg-ink-100">
        <div className="h-full bg-ember-500 transition-all" style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}
