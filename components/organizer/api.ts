'use client';
/** Browser-side calls to the organizer API: JSON or multipart in, `{ ok, status, data }` out, never a throw. */
import type { ZodType } from 'zod';
import { fieldErrors } from '@/lib/http';

export interface ApiAnswer {
  ok: boolean;
  status: number;
  data: { error?: string; message?: string; fields?: Record<string, string>; [k: string]: unknown };
}

export async function callApi(url: string, method: 'POST' | 'PUT' | 'DELETE', body?: unknown): Promise<ApiAnswer> {
  try {
    const isForm = typeof FormData !== 'undefined' && body instanceof FormData;
    const res = await fetch(url, {
      method,
      headers: isForm || body === undefined ? undefined : { 'content-type': 'application/json' },
      body: isForm ? (body as FormData) : body === undefined ? undefined : JSON.stringify(body),
    });
    const data = await res.json().catch(() => ({}));
    return { ok: res.ok, status: res.status, data };
  } catch {
    return { ok: false, status: 0, data: { error: 'Could not reach Hotlap. Check your connection and try again.' } };
  }
}

/** A number typed in a form, or the raw text when it is not one (so the schema names the problem). */
export function numberOrText(raw: string): number | string | undefined {
  const t = raw.trim();
  if (t === '') return undefined;
  const n = Number(t.replace(',', '.'));
  return Number.isFinite(n) ? n : t;
}

export interface CheckedAnswer {
  ok: boolean;
  data: ApiAnswer['data'];
  /** per-field messages, from the schema here or from the server */
  fields: Record<string, string>;
  /** the general message to show when not ok */
  error: string | null;
}

/**
 * Checks `raw` with the shared schema first (no request when it fails), then sends what the
 * schema produced; either way the answer carries field messages ready for the form.
 */
export async function sendChecked<S extends ZodType>(schema: S, raw: unknown, url: string, method: 'POST' | 'PUT', invalid = 'Some fields need attention.'): Promise<CheckedAnswer> {
  const parsed = schema.safeParse(raw);
  if (!parsed.success) return { ok: false, data: {}, fields: fieldErrors(parsed.error), error: invalid };
  const res = await callApi(url, method, parsed.data);
  return res.ok
    ? { ok: true, data: res.data, fields: {}, error: null }
    : { ok: false, data: res.data, fields: res.data.fields ?? {}, error: res.data.error ?? `The server answered ${res.status}.` };
}
