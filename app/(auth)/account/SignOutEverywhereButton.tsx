'use client';
import { useState } from 'react';

export function SignOutEverywhereButton() {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  async function onClick() {
    setBusy(true);
    setError(null);
    const res = await fetch('/api/account/sessions', { method: 'DELETE' }).catch(() => null);
    if (res?.ok) {
      // A full page load, not a client-side push: nothing of the ended session stays in memory.
      // eslint-disable-next-line @next/next/no-location-assign-relative-destination
      window.location.assign('/signin');
      return;
    }
    setBusy(false);
    setError(res ? ((await res.json().catch(() => null))?.error ?? 'That did not work. Try again.') : 'No connection. Try again.');
  }

  return (
    <div>
      <button type="button" className="btn-primary" onClick={onClick} disabled={busy} data-testid="sign-out-everywhere">
        {busy ? 'Signing out…' : 'Sign out everywhere'}
      </button>
      {error && <p role="alert" className="mt-2 text-sm text-alarm-700">{error}</p>}
    </div>
  );
}
