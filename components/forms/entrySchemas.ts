/**
 * The entry forms' zod schemas, built from the one the API handlers parse with
 * (EntryDetailsSchema): a season that asks for a video makes the link required, with the server's
 * own sentence. Used with react-hook-form's zod resolver.
 */
import { EntryDetailsSchema } from '@/lib/entries/schema';
import { EVIDENCE_LINK_REQUIRED } from '@/lib/entries/messages';

export function entryFormSchema(videoRequired: boolean) {
  const link = EntryDetailsSchema.shape.evidenceUrl;
  return videoRequired ? EntryDetailsSchema.extend({ evidenceUrl: link.refine((u) => u !== '', EVIDENCE_LINK_REQUIRED) }) : EntryDetailsSchema;
}

/** The fields the draft's "Edit details" form changes (class, machine and material family stay). */
export const EDITABLE_DETAIL_FIELDS = ['claimedTime', 'evidenceUrl', 'measuredXMm', 'measuredYMm', 'measuredZMm', 'materialName', 'notes'] as const;

export function entryDetailsFormSchema(videoRequired: boolean) {
  return entryFormSchema(videoRequired).pick({ claimedTime: true, evidenceUrl: true, measuredXMm: true, measuredYMm: true, measuredZMm: true, materialName: true, notes: true });
}
