/**
 * Public pages' data, kept per value of the standings change counter (`standings_version`). The
 * pages themselves render per request (each carries its own CSP nonce); what they skip when nothing
 * changed is every database read but one: the counter, read once per render (React's per-request
 * `cache`). Any write a public page shows bumps the counter in the database (triggers), so the very
 * next request on any web server sharing the database loads afresh — never a stale rank.
 */
import { cache } from 'react';
import { standingsVersion } from './query';

/** The counter for this render: read once however many page parts ask (null: nothing may be kept). */
export const renderVersion = cache(standingsVersion);

interface Kept {
  version: number;
  value: Promise<unknown>;
}
/*
 * One map per process, on `globalThis` under a `Symbol.for` key: module instances are per bundle
 * (see keptAnswers.ts), and a page and a route handler that keep the same value (the season
 * overview's page and its API) must share one build, not make one each.
 */
const STORE = Symbol.for('hotlap.keptPageData');
const kept: Map<string, Kept> = ((globalThis as typeof globalThis & { [STORE]?: Map<string, Kept> })[STORE] ??= new Map());
/** Distinct values kept (class × query views, entries, seasons, overviews); least recently used go first. */
const KEPT_MAX = 2000;

/**
 * The value `load` returned for `key` while the counter held its current value, or a fresh load
 * kept under it. The counter is read before loading, so a kept value is never older than its
 * version. Concurrent requests for the same stale key share one load; a failed load (a 404 too) is
 * not kept.
 */
export async function keptForVersion<T>(key: string, load: () => Promise<T>): Promise<T> {
  const version = await renderVersion();
  if (version === null) return load();
  const hit = kept.get(key);
  if (hit && hit.version === version) {
    kept.delete(key);
    kept.set(key, hit); // most recently used last
    return hit.value as Promise<T>;
  }
  const value = load();
  kept.set(key, { version, value });
  value.catch(() => {
    if (kept.get(key)?.value === value) kept.delete(key);
  });
  while (kept.size > KEPT_MAX) kept.delete(kept.keys().next().value as string);
  return value;
}

/** Forget kept page data (tests and tools that rewrite the database wholesale). */
export function clearPublicPageData() {
  kept.clear();
}
