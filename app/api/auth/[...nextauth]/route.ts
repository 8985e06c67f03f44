/**
 * next-auth's handler, through route() like every handler (origin check, body limit). Sign-in
 * throttling lives inside `authorize` (lib/auth/options.ts), on the e-mail next-auth itself parsed;
 * here a refusal it signalled becomes HTTP 429 with Retry-After.
 */
import NextAuth from 'next-auth';
import { authOptions, signInContext } from '@/lib/auth/options';
import { route } from '@/lib/http';
import { appUrl } from '@/lib/mail';
import { tooManyMessage } from '@/lib/auth/messages';

const handler = NextAuth(authOptions);
type Ctx = { params: Promise<{ nextauth: string[] }> };

export const GET = route<Ctx>((req, ctx) => handler(req, ctx));

export const POST = route<Ctx>(async (req, ctx) => {
  const state: { retryAfterS?: number } = {};
  const res: Response = await signInContext.run(state, () => handler(req, ctx));
  if (state.retryAfterS === undefined) return res;
  const out = Response.json(
    { error: 'TooManyAttempts', message: tooManyMessage(state.retryAfterS), url: appUrl('/signin?error=TooManyAttempts') },
    { status: 429, headers: { 'Retry-After': String(state.retryAfterS) } },
  );
  // Keep whatever cookies next-auth set (its CSRF cookie).
  for (const c of res.headers.getSetCookie()) out.headers.append('set-cookie', c);
  return out;
});
