/**
 * next-auth's handler, with sign-in throttling in front of the credentials callback: slowed answers
 * after a few failures, then HTTP 429 (Retry-After) for a while.
 */
import NextAuth from 'next-auth';
import { authOptions } from '@/lib/auth/options';
import { checkThrottle, tooManyMessage } from '@/lib/auth/throttle';
import { clientIp } from '@/lib/http';
import { appUrl } from '@/lib/mail';

const handler = NextAuth(authOptions);
type Ctx = { params: Promise<{ nextauth: string[] }> };

export const GET = handler;

export async function POST(req: Request, ctx: Ctx) {
  const { pathname } = new URL(req.url);
  if (pathname.endsWith('/callback/credentials')) {
    const form = await req.clone().formData().catch(() => null);
    const email = String(form?.get('email') ?? '');
    const verdict = await checkThrottle(email, clientIp(req.headers));
    if (verdict.refused) {
      return Response.json(
        {
          error: 'TooManyAttempts',
          message: tooManyMessage(verdict.retryAfterS),
          url: appUrl(`/signin?error=TooManyAttempts`),
        },
        { status: 429, headers: { 'Retry-After': String(verdict.retryAfterS) } },
      );
    }
    if (verdict.delayMs) await new Promise((r) => setTimeout(r, verdict.delayMs));
  }
  return handler(req, ctx);
}
