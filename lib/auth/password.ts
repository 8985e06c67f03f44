import bcrypt from 'bcryptjs';

/** bcrypt cost 12: about 0.2–0.3 s per hash on this class of machine (OWASP recommends ≥ 10). */
const COST = Number(process.env.BCRYPT_COST || 12);

export const hashPassword = (plain: string) => bcrypt.hash(plain, COST);
export const checkPassword = (plain: string, hash: string) => bcrypt.compare(plain, hash);

/** A real hash of a random password, compared against when the e-mail is unknown so timing does not tell. */
let decoy: Promise<string> | null = null;
export const decoyHash = () => (decoy ??= bcrypt.hash('decoy-' + Math.random(), COST));
