/** Route parameters of the review desk's API, one schema each. */
import { z } from 'zod';
import { idSchema } from '@/lib/ids';

export const EntryParams = z.object({ id: idSchema('The entry number must be a positive whole number.') });
export const EntryFileParams = EntryParams.extend({ fileId: idSchema('The file number must be a positive whole number.') });
