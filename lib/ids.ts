/**
 * The one id schema: ids in paths, query strings and bodies are plain positive whole numbers
 * written with digits only. `Number()` would also take "1e1", "0x7", " 7" or "07" and resolve them
 * to another record than the text names; those are refused here. Client-safe (zod only).
 */
import { z } from 'zod';

/** Digits only, no leading zero, at most 15 digits (stays a safe integer). */
const ID_TEXT = /^[1-9][0-9]{0,14}$/;

/** The id, or null when `v` is not a plain positive whole number (a JSON number or its digits). */
export function parseId(v: unknown): number | null {
  if (typeof v === 'number') return Number.isSafeInteger(v) && v > 0 ? v : null;
  if (typeof v === 'string' && ID_TEXT.test(v)) return Number(v);
  return null;
}

/** A zod schema for one id; `message` is the sentence shown when it is not one. */
export function idSchema(message = 'The id must be a positive whole number written with digits only.') {
  return z.unknown().transform((v, ctx): number => {
    const id = parseId(v);
    if (id === null) {
      ctx.addIssue({ code: 'custom', message, input: v });
      return z.NEVER;
    }
    return id;
  });
}

/** Route parameter `[id]`. */
export const IdParams = z.object({ id: idSchema() });
