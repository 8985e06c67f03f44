'use client';
import { PageError } from '@/components/RouteStates';

export default function ErrorPage({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <PageError error={error} reset={reset} what="the review desk" home="/judging" />;
}
