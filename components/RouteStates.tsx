'use client';
/**
 * What a route group shows while its page loads (loading.tsx) and when rendering it failed
 * (error.tsx): a sentence saying what happened, that nothing saved was lost, and a retry.
 */
import { useEffect } from 'react';
import Link from 'next/link';

export function PageLoading({ what }: { what: string }) {
  return (
    <div role="status" aria-live="polite" className="space-y-4" data-testid="page-loading">
      <p className="text-ink-600">Loading {what}…</p>
      <div className="h-6 w-1/3 animate-pulse rounded bg-ink-100" />
      <div className="h-40 animate-pulse rounded-xl bg-ink-100" />
    </div>
  );
}

export function PageError({ error, reset, what, home = '/' }: { error: Error & { digest?: string }; reset: () => void; what: string; home?: string }) {
  useEffect(() => {
    console.error(error);
  }, [error]);
  return (
    <div role="alert" className="card max-w-2xl space-y-3" data-testid="page-error">
      <h1 className="text-xl">This page could not be shown</h1>
      <p className="text-ink-700">
        Something went wrong on our side while loading {what}. Nothing you saved is lost: try again, or come back in a minute.
        {error.digest ? <> If it keeps happening, tell the organizers this code: <code>{error.digest}</code>.</> : null}
      </p>
      <div className="flex flex-wrap gap-3">
        <button type="button" className="btn-primary" onClick={() => reset()}>Try again</button>
        <Link href={home} className="btn-quiet">Go to {home === '/' ? 'the home page' : 'the overview'}</Link>
      </div>
    </div>
  );
}
