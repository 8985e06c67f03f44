/** Input of a judge's decision: one schema shared by the decision form and the route handler. */
import { z } from 'zod';
import { REVIEW_DECISIONS } from '@/lib/domain';
import { REASON_CODES, REASON_CODE_LIST, DECISION_LABELS } from './reasons';
import { ChecklistSchema } from './checklist';

/** States a decision can start from: a submitted entry, or a decided one a judge reverses with a new decision. */
export const DECIDABLE_STATES = ['submitted', 'verified', 'rejected', 'returned'] as const;
export const NOTE_MAX_CHARS = 2000;

export const DecisionSchema = z
  .object({
    decision: z.enum(REVIEW_DECISIONS, { message: 'Choose verify, reject or return for changes.' }),
    reasonCodes: z
      .array(z.enum(REASON_CODE_LIST, { message: 'Unknown reason code.' }))
      .min(1, { message: 'Choose at least one reason.' })
      .max(REASON_CODE_LIST.length),
    note: z
      .string({ message: 'Write a note for the entrant.' })
      .trim()
      .min(3, { message: 'Write a note for the entrant (at least a few words).' })
      .max(NOTE_MAX_CHARS, { message: `Keep the note under ${NOTE_MAX_CHARS} characters.` }),
    checklist: ChecklistSchema.default({}),
    /** The state the judge saw; the decision is refused when someone else changed it meanwhile. */
    expectedState: z.enum(DECIDABLE_STATES).default('submitted'),
  })
  .superRefine((v, ctx) => {
    const wrong = v.reasonCodes.filter((c) => !(REASON_CODES[c].decisions as readonly string[]).includes(v.decision));
    if (wrong.length) {
      ctx.addIssue({
        code: 'custom',
        path: ['reasonCodes'],
        message: `These reasons do not fit “${DECISION_LABELS[v.decision].verb}”: ${wrong.map((c) => REASON_CODES[c].label).join('; ')}.`,
      });
    }
  });
export type DecisionInput = z.infer<typeof DecisionSchema>;
