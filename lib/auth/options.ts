/** next-auth configuration: e-mail + password sign-in, JWT sessions carrying the user id. */
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { User } from '@/models';
import { checkPassword, decoyHash } from '@/lib/auth/password';
import { recordFailure, recordSuccess } from '@/lib/auth/throttle';
import { clientIp } from '@/lib/http';
import { EmailSchema } from '@/lib/auth/schemas';
import { loadUser } from '@/lib/auth/loadUser';

/** Error codes the sign-in form turns into sentences (see SIGN_IN_ERRORS). */
export const EMAIL_NOT_VERIFIED = 'EmailNotVerified';

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: 30 * 24 * 3600 },
  pages: { signIn: '/signin', error: '/signin' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = EmailSchema.safeParse(credentials?.email ?? '');
        const password = String(credentials?.password ?? '');
        const ip = clientIp((req?.headers ?? {}) as Record<string, string>);
        const email = parsed.success ? parsed.data : String(credentials?.email ?? '');
        const user = parsed.success ? await User.findOne({ where: { email } }) : null;
        // Compare against a decoy hash when there is no user, so the answer takes as long either way.
        const ok = await checkPassword(password, user?.passwordHash ?? (await decoyHash()));
        if (!user || !ok) {
          await recordFailure(email, ip);
          return null;
        }
        // Only someone who knows the password learns that the address still needs confirming.
        if (!user.emailVerifiedAt) throw new Error(EMAIL_NOT_VERIFIED);
        await recordSuccess(email);
        return { id: String(user.id), email: user.email, name: user.name };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) token.uid = Number(user.id);
      return token;
    },
    async session({ session, token }) {
      // Roles come from the database on every request, so a role change applies at once.
      const user = token.uid ? await loadUser(token.uid as number) : null;
      if (!user) return { ...session, user: undefined };
      session.user = { id: user.id, name: user.name, email: user.email, roles: user.roles };
      return session;
    },
  },
};
