/**
 * Sign-in throttling per e-mail and per client address. Failures for one e-mail inside a 15-minute
 * window first slow the answer (from the 4th failure, +1 s each, at most 5 s), then from the 8th
 * failure refuse for 15 minutes with HTTP 429. One address is refused after 30 failures over any
 * e-mails (higher, since an address may be shared behind NAT). Counting per e-mail stops a
 * spread-out attack on one account; counting per address stops one client spraying many e-mails.
 * The address is known only behind a trusted proxy (TRUST_PROXY=1, see lib/http.ts clientIp).
 */
import { Throttle } from '@/models';

export const THROTTLE = {
  windowMs: 15 * 60_000,
  slowAfter: 3,
  slowStepMs: 1000,
  slowMaxMs: 5000,
  lockAfter: 8,
  ipLockAfter: 30,
  lockMs: 15 * 60_000,
};

const emailKey = (email: string) => `email:${email.trim().toLowerCase()}`;
const keys = (email: string, ip: string | null) => (ip ? [emailKey(email), `ip:${ip}`] : [emailKey(email)]);

export interface ThrottleVerdict {
  refused: boolean;
  retryAfterS: number;
  delayMs: number;
}

export async function checkThrottle(email: string, ip: string | null, now = new Date()): Promise<ThrottleVerdict> {
  const rows = await Throttle.findAll({ where: { key: keys(email, ip) } });
  let failures = 0;
  let lockedUntil = 0;
  for (const r of rows) {
    if (r.key.startsWith('email:') && now.getTime() - r.windowStart.getTime() < THROTTLE.windowMs) failures = r.failures;
    if (r.lockedUntil) lockedUntil = Math.max(lockedUntil, r.lockedUntil.getTime());
  }
  if (lockedUntil > now.getTime()) {
    return { refused: true, retryAfterS: Math.ceil((lockedUntil - now.getTime()) / 1000), delayMs: 0 };
  }
  const over = failures - THROTTLE.slowAfter;
  return { refused: false, retryAfterS: 0, delayMs: over > 0 ? Math.min(THROTTLE.slowMaxMs, over * THROTTLE.slowStepMs) : 0 };
}

export async function recordFailure(email: string, ip: string | null, now = new Date()) {
  for (const key of keys(email, ip)) {
    const row = await Throttle.findByPk(key);
    const fresh = !row || now.getTime() - row.windowStart.getTime() >= THROTTLE.windowMs;
    const failures = fresh ? 1 : row!.failures + 1;
    const limit = key.startsWith('ip:') ? THROTTLE.ipLockAfter : THROTTLE.lockAfter;
    const lockedUntil = failures >= limit ? new Date(now.getTime() + THROTTLE.lockMs) : (fresh ? null : row!.lockedUntil);
    await Throttle.upsert({ key, failures, windowStart: fresh ? now : row!.windowStart, lockedUntil });
  }
}

/** A successful sign-in clears the e-mail's counter (the address keeps its count). */
export async function recordSuccess(email: string) {
  await Throttle.destroy({ where: { key: emailKey(email) } });
}

export const tooManyMessage = (retryAfterS: number) => {
  const min = Math.max(1, Math.ceil(retryAfterS / 60));
  return `Too many failed sign-ins. Wait ${min} minute${min > 1 ? 's' : ''} and try again, or reset your password.`;
};
