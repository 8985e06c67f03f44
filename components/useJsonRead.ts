'use client';
/**
 * A client table's read of one of our JSON APIs by URL, through TanStack Query (the Providers'
 * client): the server-rendered first answer is the initial data of its URL (no second request on
 * mount); while another URL loads, the last answer stays on screen (after a failure: the first).
 */
import { keepPreviousData, useQuery } from '@tanstack/react-query';

/** One of our JSON APIs' answer, or its error sentence as the thrown Error's message. */
export async function readJson<T>(url: string, signal?: AbortSignal): Promise<T> {
  const res = await fetch(url, { signal });
  const body = await res.json();
  if (!res.ok) throw new Error(body.error ?? `The server answered ${res.status}.`);
  return body as T;
}

export function useJsonRead<T>(url: string, initial: T, initialUrl: string): { data: T; error: string | null; loading: boolean } {
  const q = useQuery({
    queryKey: ['json-read', url],
    queryFn: ({ signal }) => readJson<T>(url, signal),
    initialData: url === initialUrl ? initial : undefined,
    refetchOnMount: false,
    placeholderData: keepPreviousData,
  });
  return { data: q.data ?? initial, error: q.error ? q.error.message : null, loading: q.isFetching };
}
