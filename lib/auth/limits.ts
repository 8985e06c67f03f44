/**
 * Rate limits for sign-in and for the routes that send mail, counted in the database
 * (lib/auth/limiterStore.ts) so that several web servers sharing it agree.
 *
 * Sign-in, per failed attempt (counted BEFORE the password is checked, so 30 attempts sent at once
 * are 30 attempts, and refunded when it succeeds):
 * - account + address: the first 3 failures answer at once, then each waits 1 s more (at most 5 s),
 *   and past the 10th within 15 minutes that address is refused for that account until the window ends;
 * - address: 50 failures in 15 minutes over any accounts refuses the address (high, since many
 *   people can share one address behind NAT);
 * - account, from anywhere: slowed after 5 failures in an hour and refused after 30 — but never for
 *   an address the owner signed in from in the last 30 days, and a completed password reset clears
 *   it, so a stranger who hammers a known name cannot keep its owner out.
 * The address is known only behind a trusted proxy (TRUST_PROXY=N, lib/http.ts clientIp); without
 * it only the account limit applies.
 */
import { RateLimiterRes } from 'rate-limiter-flexible';
import { RateLimiterDatabase, deleteLimitKeys } from '@/lib/auth/limiterStore';
import { HttpError } from '@/lib/errors';

export const SIGN_IN_LIMITS = {
  // No separate block period: every attempt is counted (attempts during a refusal too), and the
  // refusal lasts until the window that holds them ends.
  pair: { points: 10, durationS: 15 * 60 },
  address: { points: 50, durationS: 15 * 60 },
  account: { points: 30, durationS: 3600 },
  knownAddressS: 30 * 24 * 3600,
  freePairFailures: 3,
  freeAccountFailures: 5,
  slowStepMs: 1000,
  slowMaxMs: 5000,
};

/** Mail-sending routes: per e-mail address and per client address, per hour. */
export const MAIL_LIMITS = {
  perEmail: { points: 5, durationS: 3600 },
  perAddress: { points: 20, durationS: 3600 },
};

const limiter = (keyPrefix: string, o: { points: number; durationS: number }) =>
  new RateLimiterDatabase({ keyPrefix, points: o.points, duration: o.durationS });

const limiters = {
  pair: limiter('signin_pair', SIGN_IN_LIMITS.pair),
  address: limiter('signin_addr', SIGN_IN_LIMITS.address),
  account: limiter('signin_acct', SIGN_IN_LIMITS.account),
  known: limiter('signin_known', { points: 1, durationS: SIGN_IN_LIMITS.knownAddressS }),
  mailEmail: limiter('mail_email', MAIL_LIMITS.perEmail),
  mailAddress: limiter('mail_addr', MAIL_LIMITS.perAddress),
};

const pairKey = (email: string, ip: string) => `${email}|${ip}`;

/** A 429 whose Retry-After header lib/http.ts errorResponse sets from retryAfterS. */
export class RateLimited extends HttpError {
  constructor(
    message: string,
    public readonly retryAfterS: number,
  ) {
    super(429, message, undefined, 'rate_limited');
  }
}

export class TooManyAttempts extends Error {
  constructor(public readonly retryAfterS: number) {
    super('TooManyAttempts');
  }
}

/** rate-limiter-flexible rejects with a RateLimiterRes when over the limit, with an Error on store failure. */
async function consume(l: RateLimiterDatabase, key: string): Promise<{ over: boolean; consumed: number; msBeforeNext: number }> {
  try {
    const r = await l.consume(key);
    return { over: false, consumed: r.consumedPoints, msBeforeNext: r.msBeforeNext };
  } catch (e) {
    if (e instanceof RateLimiterRes) return { over: true, consumed: e.consumedPoints, msBeforeNext: e.msBeforeNext };
    throw e;
  }
}

export const slowDownMs = (failures: number, free: number) =>
  Math.min(SIGN_IN_LIMITS.slowMaxMs, Math.max(0, failures - free) * SIGN_IN_LIMITS.slowStepMs);

export interface SignInAttempt {
  /** Call when the password was right: refunds the attempt and remembers the address. */
  succeeded(): Promise<void>;
}

/**
 * Counts one sign-in attempt for this e-mail (as parsed by next-auth) and address. Throws
 * TooManyAttempts when a limit is reached; otherwise waits the slow-down, then returns.
 */
export async function countSignInAttempt(email: string, ip: string | null): Promise<SignInAttempt> {
  const known = ip ? (await limiters.known.get(pairKey(email, ip))) !== null : false;
  const results = await Promise.all([
    ip ? consume(limiters.pair, pairKey(email, ip)) : null,
    ip && !known ? consume(limiters.address, ip) : null,
    known ? null : consume(limiters.account, email),
  ]);
  const [pair, address, account] = results;
  const over = results.filter((r) => r?.over);
  if (over.length) throw new TooManyAttempts(Math.max(60, ...over.map((r) => Math.ceil(r!.msBeforeNext / 1000))));
  // Consumed counts include this attempt, so failures so far are one less.
  const delay = Math.max(
    pair ? slowDownMs(pair.consumed - 1, SIGN_IN_LIMITS.freePairFailures) : 0,
    account ? slowDownMs(account.consumed - 1, SIGN_IN_LIMITS.freeAccountFailures) : 0,
  );
  if (delay) await new Promise((r) => setTimeout(r, delay));
  return {
    async succeeded() {
      await Promise.all([
        ip ? limiters.pair.delete(pairKey(email, ip)) : null,
        address ? limiters.address.reward(ip!, 1) : null,
        account ? limiters.account.reward(email, 1) : null,
        ip ? limiters.known.set(pairKey(email, ip), 1, SIGN_IN_LIMITS.knownAddressS) : null,
      ]);
    },
  };
}

/** After a completed password reset (the owner proved the mailbox): the account's windows start again. */
export async function clearSignInLimits(email: string, ip: string | null) {
  await Promise.all([limiters.account.delete(email), deleteLimitKeys(`signin_pair:${email}|`)]);
  if (ip) await limiters.known.set(pairKey(email, ip), 1, SIGN_IN_LIMITS.knownAddressS);
}

export const MAIL_LIMIT_MESSAGE = 'Too many e-mails were asked for. Wait an hour and try again, or check your spam folder for the last one.';

/**
 * Counts one mail-sending request per e-mail and per client address; over either limit it throws a
 * 429 with a sentence. Callers answer the same either way otherwise, so this reveals nothing about
 * whether the address has an account.
 */
export async function countMailRequest(email: string, ip: string | null) {
  const [a, b] = await Promise.all([consume(limiters.mailEmail, email.toLowerCase()), ip ? consume(limiters.mailAddress, ip) : null]);
  const over = [a, b].filter((r) => r?.over);
  if (over.length) {
    const retryAfterS = Math.max(...over.map((r) => Math.ceil(r!.msBeforeNext / 1000)));
    throw new RateLimited(MAIL_LIMIT_MESSAGE, retryAfterS);
  }
}
