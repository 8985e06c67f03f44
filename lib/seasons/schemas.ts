/**
 * One zod schema per organizer input, shared by the browser forms (checked before sending) and the
 * route handlers (checked again on the server). Client-safe: no database or Node imports.
 */
import { z } from 'zod';
import { MOTION_SYSTEMS, MODIFICATION_CLASSES, SEASON_STATES, type SeasonState } from '@/lib/domain';
import { MAX_RULES, RuleSchema } from '@/lib/inspection/rules';
import { MaterialFamilySchema } from '@/lib/inspection/materials';
import { LOCAL_DATETIME_RE, isRealLocalDateTime, isTimeZone } from '@/lib/seasons/time';
import { MARKDOWN_MAX_CHARS } from '@/lib/seasons/markdown';
import { EmailSchema } from '@/lib/auth/schemas';
import { idSchema } from '@/lib/ids';

export const SLUG_RE = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;

const text = (what: string, min: number, max: number) =>
  z
    .string({ error: `${what} is required.` })
    .trim()
    .min(min, { message: min <= 1 ? `${what} is required.` : `${what} needs at least ${min} characters.` })
    .max(max, { message: `${what} can have at most ${max} characters.` });

export const slugSchema = (what: string) =>
  text(what, 2, 64).regex(SLUG_RE, { message: `${what}: use lower-case letters, digits and single hyphens, e.g. "frostbite-sprint".` });

const whole = (what: string, min: number, max: number) =>
  z
    .number({ error: (iss) => (iss.input === undefined ? `${what} is required.` : `${what} must be a whole number.`) })
    .int({ message: `${what} must be a whole number.` })
    .min(min, { message: `${what} must be at least ${min}.` })
    .max(max, { message: `${what} can be at most ${max}.` });

const localDateTime = (what: string) =>
  z
    .string({ error: `${what} is required.` })
    .regex(LOCAL_DATETIME_RE, { message: `${what}: enter a date and a time (YYYY-MM-DD HH:MM).` })
    .refine(isRealLocalDateTime, { message: `${what} is not a real date and time: check the month (1–12), the day of that month, the hour (0–23) and the minutes (0–59).` });

export const TIMING_CONVENTIONS = [
  'First extrusion to last extrusion',
  'Print start command to print end command',
  'Start of the first layer to the end of the last layer',
] as const;

export const SeasonInputSchema = z
  .object({
    name: text('The name', 3, 120),
    slug: slugSchema('The address name'),
    hostName: text('The host (club or group)', 2, 120),
    description: z.string().max(MARKDOWN_MAX_CHARS, { message: `The description can have at most ${MARKDOWN_MAX_CHARS} characters.` }).default(''),
    opensAt: localDateTime('The opening date'),
    closesAt: localDateTime('The closing date'),
    timeZone: z.string({ error: 'The time zone is required.' }).refine(isTimeZone, { message: 'Unknown time zone: use an IANA name such as UTC, Europe/Berlin or America/Chicago.' }),
    timingConvention: text('The timing convention', 3, 300),
    photosRequired: whole('The number of photos', 0, 10),
    photoKinds: z.array(text('Each photo description', 1, 120)).max(10).default([]),
    videoRequired: z.boolean({ error: 'Say whether a video link is required.' }),
    entryLimit: whole('The entry limit', 1, 50),
    verificationsRequired: whole('The verifications needed', 1, 2),
  })
  .superRefine((s, ctx) => {
    // Same zone on both sides, same fixed format: the strings compare like the instants.
    if (LOCAL_DATETIME_RE.test(s.opensAt) && LOCAL_DATETIME_RE.test(s.closesAt) && s.closesAt <= s.opensAt)
      ctx.addIssue({ code: 'custom', path: ['closesAt'], message: 'The season must close after it opens: pick a closing date later than the opening date.' });
    if (s.photoKinds.length > s.photosRequired)
      ctx.addIssue({ code: 'custom', path: ['photoKinds'], message: `You describe ${s.photoKinds.length} photos but require ${s.photosRequired}; describe at most as many as you require.` });
  });
export type SeasonInput = z.infer<typeof SeasonInputSchema>;

/** "0.4, 0.6" or [0.4, 0.6] → [0.4, 0.6]; a word that is not a number stays and fails with its own message. */
const numberList = (what: string, maxMm: number) =>
  z.preprocess(
    (v) => (typeof v === 'string' ? v.split(/[,;\s]+/).filter(Boolean).map((t) => (Number.isFinite(Number(t)) ? Number(t) : t)) : v),
    z
      .array(
        z
          .number({ error: (iss) => `${what}: ${JSON.stringify(iss.input)} is not a number in mm.` })
          .positive({ message: `${what} must be above 0 mm.` })
          .max(maxMm, { message: `${what} above ${maxMm} mm is not a realistic value.` }),
      )
      .max(12, { message: `At most 12 values for ${what.toLowerCase()}.` }),
  );

const optionalMm = (what: string, maxMm: number) =>
  z.preprocess(
    (v) => (v === '' || v === undefined ? null : typeof v === 'string' && Number.isFinite(Number(v)) ? Number(v) : v),
    z
      .number({ error: (iss) => `${what} must be a number in mm (got ${JSON.stringify(iss.input)}).` })
      .positive({ message: `${what} must be above 0 mm.` })
      .max(maxMm, { message: `${what} above ${maxMm} mm is not a realistic value.` })
      .nullable(),
  );

export const ClassInputSchema = z
  .object({
    name: text('The class name', 2, 120),
    slug: slugSchema('The class address name'),
    description: z.string().max(2000, { message: 'The description can have at most 2000 characters.' }).default(''),
    nozzleDiametersMm: numberList('Nozzle diameter', 3).default([]),
    nozzleMinMm: optionalMm('The minimum nozzle', 3).default(null),
    materialFamilies: z.array(MaterialFamilySchema).max(20).default([]),
    motionSystems: z.array(z.enum(MOTION_SYSTEMS, { error: () => `Motion system must be one of: ${MOTION_SYSTEMS.join(', ')}.` })).max(4).default([]),
    buildVolumeMinMm: optionalMm('The smallest build volume', 2000).default(null),
    buildVolumeMaxMm: optionalMm('The largest build volume', 2000).default(null),
    modification: z.enum(MODIFICATION_CLASSES, { error: () => 'Choose stock, modified or any.' }).default('any'),
  })
  .superRefine((c, ctx) => {
    if (c.buildVolumeMinMm !== null && c.buildVolumeMaxMm !== null && c.buildVolumeMaxMm < c.buildVolumeMinMm)
      ctx.addIssue({ code: 'custom', path: ['buildVolumeMaxMm'], message: 'The largest build volume must not be below the smallest.' });
    if (c.nozzleMinMm !== null && c.nozzleDiametersMm.length)
      ctx.addIssue({ code: 'custom', path: ['nozzleMinMm'], message: 'Give either a list of nozzle diameters or a minimum, not both.' });
  });
export type ClassInput = z.infer<typeof ClassInputSchema>;

export const ClassOrderSchema = z.object({
  classIds: z.array(z.number().int().positive()).min(1, { message: 'Send the classes in their new order.' }).max(100),
});

/** A rule of the rulebook editor: the engine's rule plus where it applies (null = whole season). */
export const RulebookRuleSchema = z.intersection(
  RuleSchema,
  z.object({ classId: z.number({ error: 'Choose where the rule applies.' }).int().positive().nullable() }),
);
export type RulebookRule = z.infer<typeof RulebookRuleSchema>;

export const RulebookInputSchema = z.object({
  rules: z.array(RulebookRuleSchema).max(MAX_RULES, { message: `A rulebook holds at most ${MAX_RULES} rules.` }),
  /** Entries exist: the organizer accepts that every entry is inspected again under the new rules. */
  reinspect: z.boolean().default(false),
});
export type RulebookInput = z.infer<typeof RulebookInputSchema>;

/** What the button that moves a season into each state says. */
export const TRANSITION_LABELS: Record<SeasonState, string> = {
  draft: 'Back to draft',
  open: 'Open for entries',
  judging: 'Close entries and start judging',
  final: 'Publish final standings',
  archived: 'Archive the season',
};

export const TransitionSchema = z.object({
  to: z.enum(SEASON_STATES, { error: () => `The new state must be one of: ${SEASON_STATES.join(', ')}.` }),
  notify: z.boolean().default(false),
  note: z.string().max(2000, { message: 'The note can have at most 2000 characters.' }).default(''),
});
export type TransitionInput = z.infer<typeof TransitionSchema>;

export const JudgeByEmailSchema = z.object({ email: EmailSchema });
export const ReinspectSchema = z.object({ confirm: z.literal(true, { error: 'Confirm that every entry is inspected again.' }) });

export const TEST_PIECE_MAX_BYTES = 100 * 1024 * 1024;

const positiveId = (what: string) => idSchema(`${what} must be a positive whole number.`);
export const SeasonParams = z.object({ id: positiveId('The season id') });
export const ClassParams = z.object({ id: positiveId('The season id'), classId: positiveId('The class id') });
export const JudgeParams = z.object({ id: positiveId('The season id'), userId: positiveId('The user id') });
export const InvitationParams = z.object({ id: positiveId('The season id'), invitationId: positiveId('The invitation id') });
export const OrganizerParams = z.object({ id: positiveId('The season id'), userId: positiveId('The user id') });
