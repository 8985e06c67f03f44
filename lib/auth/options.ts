/** next-auth configuration: e-mail + password sign-in, JWT sessions carrying the user id. */
import { AsyncLocalStorage } from 'node:async_hooks';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { User } from '@/models';
import { checkPassword, decoyHash, hashPassword } from '@/lib/auth/password';
import { countSignInAttempt, TooManyAttempts } from '@/lib/auth/limits';
import { appOrigin, clientIp } from '@/lib/http';
import { EmailSchema } from '@/lib/auth/schemas';
import { loadUser } from '@/lib/auth/loadUser';
import { newSessionId, revokeSession, sessionIsLive, SESSION_MAX_AGE_S, type SessionClaims } from '@/lib/auth/sessions';
import { safeCallbackPath } from '@/lib/security/urls';

/** Error codes the sign-in form turns into sentences (see SIGN_IN_ERRORS). */
export const EMAIL_NOT_VERIFIED = 'EmailNotVerified';
export const TOO_MANY_ATTEMPTS = 'TooManyAttempts';

/** Lets `authorize` tell the route handler (app/api/auth) to answer 429 with Retry-After. */
export const signInContext = new AsyncLocalStorage<{ retryAfterS?: number }>();

/** Thrown in the jwt callback for an ended session: next-auth then clears the cookie. */
const SESSION_ENDED = 'SessionEnded';

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: '/signin', error: '/signin' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        // `credentials` is the body next-auth parsed (JSON or form; last value of a repeated field),
        // so the throttle counts exactly the e-mail whose password is checked below.
        const raw = String(credentials?.email ?? '');
        const parsed = EmailSchema.safeParse(raw);
        const email = parsed.success ? parsed.data : raw.trim().toLowerCase().slice(0, 254);
        const password = String(credentials?.password ?? '');
        const ip = clientIp((req?.headers ?? {}) as Record<string, string>);
        let attempt;
        try {
          attempt = await countSignInAttempt(email, ip);
        } catch (e) {
          if (!(e instanceof TooManyAttempts)) throw e;
          const store = signInContext.getStore();
          if (store) store.retryAfterS = e.retryAfterS;
          throw new Error(TOO_MANY_ATTEMPTS);
        }
        const user = parsed.success ? await User.findOne({ where: { email } }) : null;
        // Compare against a decoy hash when there is no user, so the answer takes as long either way.
        const check = await checkPassword(password, user?.passwordHash ?? (await decoyHash()));
        if (!user || !check.ok) return null;
        await attempt.succeeded();
        // Old-format hashes (plain bcrypt, 72-byte limit) are replaced now that we know the password.
        if (check.needsRehash) await user.update({ passwordHash: await hashPassword(password) });
        // Only someone who knows the password learns that the address still needs confirming.
        if (!user.emailVerifiedAt) throw new Error(EMAIL_NOT_VERIFIED);
        return { id: String(user.id), email: user.email, name: user.name, sessionVersion: user.sessionVersion };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.sv = (user as { sessionVersion?: number }).sessionVersion ?? 0;
        token.sid = newSessionId();
        return token;
      }
      // Every later read: the session must still be live (lib/auth/sessions.ts).
      const uid = token.uid as number | undefined;
      if (!uid || !(await sessionIsLive(token as SessionClaims, await loadUser(uid)))) throw new Error(SESSION_ENDED);
      return token;
    },
    async session({ session, token }) {
      // Roles come from the database on every request, so a role change applies at once.
      const user = token.uid ? await loadUser(token.uid as number) : null;
      if (!user) return { ...session, user: undefined };
      session.user = { id: user.id, name: user.name, email: user.email, roles: user.roles };
      return session;
    },
    async redirect({ url }) {
      return new URL(safeCallbackPath(url, appOrigin()), appOrigin()).toString();
    },
  },
  events: {
    async signOut({ token }) {
      const claims = token as SessionClaims & { exp?: number };
      if (typeof claims.sid === 'string') await revokeSession(claims.sid, claims.exp ? claims.exp * 1000 : undefined);
    },
  },
  logger: {
    error(code, metadata) {
      // An ended session is expected (signed out elsewhere, password changed), not an error.
      const message = (metadata as { message?: string } | undefined)?.message ?? (metadata instanceof Error ? metadata.message : '');
      if (code === 'JWT_SESSION_ERROR' && message === SESSION_ENDED) return;
      console.error(`[next-auth] ${code}`, metadata);
    },
    warn(code) {
      if (code !== 'DEBUG_ENABLED') console.warn(`[next-auth] ${code}`);
    },
    debug() {},
  },
};
