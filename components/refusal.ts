/**
 * A 403 with its reason. `forbidden()` renders app/forbidden.tsx, which takes no props; the reason
 * travels in a per-request slot (React's `cache` is scoped to one server render), so the page can
 * say "this is your own entry" where the generic page would say the role is wrong.
 */
import 'server-only';
import { cache } from 'react';
import { forbidden } from 'next/navigation';

const slot = cache(() => ({ reason: null as string | null }));

export function forbiddenBecause(reason: string): never {
  slot().reason = reason;
  forbidden();
}

/** The reason given by `forbiddenBecause` in this request, if any. */
export function refusalReason(): string | null {
  return slot().reason;
}
