'use client';
/**
 * Client-side providers, mounted once in the root layout: TanStack Query's client (polling and
 * client reads go through it, not hand-written fetch + useState). One client per browser tab,
 * kept in state so a re-render does not drop its cache.
 */
import { useState } from 'react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';

export function Providers({ children }: { children: React.ReactNode }) {
  const [client] = useState(
    () =>
      new QueryClient({
        // Pages are rendered on the server with fresh data; the client refetches only when asked
        // (polling) and never on window focus, which would repeat reads a judge or entrant did not ask for.
        defaultOptions: { queries: { refetchOnWindowFocus: false, retry: false } },
      }),
  );
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
