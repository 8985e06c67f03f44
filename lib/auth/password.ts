/**
 * Password hashing: bcrypt over a fixed-length pre-hash.
 *
 * bcrypt reads at most 72 bytes (and stops at a NUL byte), so two long passwords that share their
 * first 72 bytes would hash alike — a silent truncation. We first reduce the password to
 * HMAC-SHA-256 (32 bytes, any length in) and encode that in base64 (44 ASCII characters, no NUL),
 * then bcrypt that string. The HMAC key is a fixed label, not a secret: its job is to make the
 * pre-hash specific to this use, so a leaked unsalted SHA-256 list elsewhere cannot be replayed
 * against it (the bcrypt salt and cost still do the hard work).
 *
 * Stored form: `$hl1$` + the bcrypt string. Hashes without the marker are plain bcrypt from before;
 * they still verify, and `checkPassword` says when one should be replaced (done at sign-in).
 */
import crypto from 'node:crypto';
import bcrypt from 'bcryptjs';

/** bcrypt cost 12: about 0.2–0.3 s per hash on this class of machine (OWASP recommends ≥ 10). */
const COST = Number(process.env.BCRYPT_COST || 12);
const MARKER = '$hl1$';
const PREHASH_KEY = 'hotlap password pre-hash v1';

const prehash = (plain: string) => crypto.createHmac('sha256', PREHASH_KEY).update(plain, 'utf8').digest('base64');

export const hashPassword = async (plain: string) => MARKER + (await bcrypt.hash(prehash(plain), COST));

export interface PasswordCheck {
  ok: boolean;
  /** True when the stored hash is in the old format (or a cheaper cost) and should be rewritten. */
  needsRehash: boolean;
}

export async function checkPassword(plain: string, stored: string): Promise<PasswordCheck> {
  if (stored.startsWith(MARKER)) {
    const hash = stored.slice(MARKER.length);
    const ok = await bcrypt.compare(prehash(plain), hash);
    return { ok, needsRehash: ok && bcrypt.getRounds(hash) < COST };
  }
  const ok = await bcrypt.compare(plain, stored);
  return { ok, needsRehash: ok };
}

/** A real hash of a random password, compared against when the e-mail is unknown so timing does not tell. */
let decoy: Promise<string> | null = null;
export const decoyHash = () => (decoy ??= hashPassword('decoy-' + crypto.randomBytes(16).toString('hex')));
