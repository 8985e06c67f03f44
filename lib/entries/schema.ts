/** Entry form input: one schema for the browser form and the API. Framework-free. */
import { z } from 'zod';
import { MaterialFamilySchema } from '@/lib/inspection/materials';
import { idSchema } from '@/lib/ids';
import { CLAIMED_TIME_REQUIRED } from './messages';

/**
 * "h:mm:ss.t", "mm:ss.t" or "ss.t" (tenths optional; hundredths are rounded to tenths) → ms.
 * Null when the text is not a duration.
 */
export function parseClaimedTime(text: string): number | null {
  const m = text.trim().match(/^(?:(?:(\d{1,3}):)?([0-5]?\d):)?([0-5]?\d)(?:[.,](\d{1,3}))?$/);
  if (!m) return null;
  const h = Number(m[1] ?? 0);
  const min = Number(m[2] ?? 0);
  const s = Number(m[3]);
  const frac = m[4] ? Number(`0.${m[4]}`) : 0;
  const ms = Math.round(((h * 60 + min) * 60 + s + frac) * 10) * 100;
  return ms > 0 ? ms : null;
}

const optionalMm = (what: string) =>
  z.preprocess(
    (v) => (v === '' || v === null || v === undefined ? null : v),
    z.coerce
      .number({ error: () => `${what} must be a number in mm.` })
      .refine((v) => Number.isFinite(v) && v > 0 && v <= 1000, `${what} must be between 0 and 1000 mm.`)
      .nullable(),
  );
const id = (what: string) => idSchema(`Choose ${what}.`);

export const EntryDetailsSchema = z.object({
  seasonId: id('a season'),
  classId: id('a class'),
  machineId: id('a machine'),
  materialFamily: MaterialFamilySchema,
  materialName: z.string().trim().max(120, 'At most 120 characters.').default(''),
  nozzleMm: z.coerce.number({ error: () => 'The nozzle diameter must be a number in mm.' }).refine((v) => Number.isFinite(v) && v >= 0.1 && v <= 2, 'The nozzle diameter must be between 0.1 and 2 mm.'),
  claimedTime: z
    .string({ error: () => CLAIMED_TIME_REQUIRED })
    .trim()
    .refine((t) => parseClaimedTime(t) !== null, 'Enter the claimed time as h:mm:ss.t, e.g. 0:24:31.4.'),
  evidenceUrl: z
    .string()
    .trim()
    .max(500, 'At most 500 characters.')
    .refine((u) => u === '' || /^https?:\/\/[^\s]+$/i.test(u), 'The evidence link must start with http:// or https://.')
    .default(''),
  measuredXMm: optionalMm('Measured X'),
  measuredYMm: optionalMm('Measured Y'),
  measuredZMm: optionalMm('Measured Z'),
  notes: z.string().trim().max(4000, 'At most 4000 characters.').default(''),
});
export type EntryDetails = z.infer<typeof EntryDetailsSchema>;
export const ENTRY_DETAIL_FIELDS = Object.keys(EntryDetailsSchema.shape) as (keyof EntryDetails)[];

/** Route parameter `[id]` of entry, machine and file routes (the shared id schema). */
export { IdParams } from '@/lib/ids';
