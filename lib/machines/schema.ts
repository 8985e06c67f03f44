/** Machine form input: one schema for the browser form and the API (no server imports). */
import { z } from 'zod';
import { MOTION_SYSTEMS } from '@/lib/domain';

const text = (max: number) => z.string().trim().max(max, `At most ${max} characters.`).default('');
const mm = (what: string, min: number, max: number) =>
  z.coerce
    .number({ error: () => `${what} must be a number in mm.` })
    .refine(Number.isFinite, `${what} must be a number in mm.`)
    .refine((v) => v >= min && v <= max, `${what} must be between ${min} and ${max} mm.`);
const optionalNumber = (what: string, max: number) =>
  z.preprocess(
    (v) => (v === '' || v === null || v === undefined ? null : v),
    z.coerce.number({ error: () => `${what} must be a number.` }).refine((v) => Number.isFinite(v) && v > 0 && v <= max, `${what} must be between 0 and ${max}.`).nullable(),
  );

/** One schema for the machine form and the API. */
export const MachineSchema = z.object({
  name: z.string().trim().min(1, 'Give the machine a name.').max(120, 'At most 120 characters.'),
  motionSystem: z.enum(MOTION_SYSTEMS, { error: () => `Choose a motion system: ${MOTION_SYSTEMS.join(', ')}.` }),
  buildXMm: mm('Build X', 10, 2000),
  buildYMm: mm('Build Y', 10, 2000),
  buildZMm: mm('Build Z', 10, 2000),
  nozzleMm: mm('The nozzle diameter', 0.1, 2),
  hotend: text(200),
  extruder: text(200),
  firmware: text(200),
  maxAccelMmS2: optionalNumber('The acceleration limit (mm/s²)', 200_000),
  maxSpeedMms: optionalNumber('The speed limit (mm/s)', 5000),
  modifications: text(2000),
  isModified: z.preprocess((v) => v === true || v === 'true' || v === 'on' || v === '1', z.boolean()).default(false),
});
export type MachineInput = z.infer<typeof MachineSchema>;

