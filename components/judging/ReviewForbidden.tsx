'use client';
/** The review page's 403 screen: the reason the layout found (own entry, conflict of interest), else the role sentence. */
import Link from 'next/link';
import { createContext, useContext } from 'react';
import Forbidden from '@/app/forbidden';

const DenialContext = createContext<string | null>(null);

export function DenialProvider({ reason, children }: { reason: string | null; children: React.ReactNode }) {
  return <DenialContext.Provider value={reason}>{children}</DenialContext.Provider>;
}

export function ReviewForbidden() {
  const reason = useContext(DenialContext);
  if (!reason) return <Forbidden />;
  return (
    <div className="mx-auto max-w-md card text-center" data-testid="forbidden">
      <h1 className="mb-2">You cannot judge this entry</h1>
      <p className="text-ink-600" data-testid="forbidden-reason">{reason}</p>
      <p className="mt-4"><Link href="/judging">Back to the review desk</Link></p>
    </div>
  );
}
