/** Route parameters of the review desk's API, one schema each. */
import { z } from 'zod';

export const EntryParams = z.object({ id: z.coerce.number().int().positive('The entry number must be a positive whole number.') });
export const EntryFileParams = EntryParams.extend({ fileId: z.coerce.number().int().positive('The file number must be a positive whole number.') });
