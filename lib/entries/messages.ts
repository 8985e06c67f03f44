/**
 * Sentences an entrant sees next to a field, shared by the forms (client) and the server's checks,
 * so both say the same thing. No imports: the forms load this without zod or the database.
 */
export const CLAIMED_TIME_REQUIRED = 'Enter the claimed time as h:mm:ss.t.';
export const EVIDENCE_LINK_REQUIRED = 'This season asks for a link to the video of your print.';
