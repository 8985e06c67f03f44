'use client';
/**
 * Client-side providers for the components that read data in the browser: TanStack Query's client
 * (polling and client reads go through it, not hand-written fetch + useState) and nuqs's adapter (URL
 * state of client tables). Mounted around those components only (the audit table, the entry
 * workbench, the season overview's charts), not in the root layout: every other page would load both libraries
 * for nothing. One client per mounted tree, kept in state so a re-render does not drop its cache.
 */
import { useState } from 'react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { NuqsAdapter } from 'nuqs/adapters/next/app';

export function Providers({ children }: { children: React.ReactNode }) {
  const [client] = useState(
    () =>
      new QueryClient({
        // Pages are rendered on the server with fresh data; the client refetches only when asked
        // (polling) and never on window focus, which would repeat reads a judge or entrant did not ask for.
        defaultOptions: { queries: { refetchOnWindowFocus: false, retry: false } },
      }),
  );
  return (
    <NuqsAdapter>
      <QueryClientProvider client={client}>{children}</QueryClientProvider>
    </NuqsAdapter>
  );
}
