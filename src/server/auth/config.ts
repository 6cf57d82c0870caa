import 'server-only';
import NextAuth, { CredentialsSignin, type NextAuthResult } from 'next-auth';
import Credentials from 'next-auth/providers/credentials';
import { z } from 'zod';
import { logger } from '../logger';
import { consumeSignInToken, getUserByEmail, getUserById } from '../queries/users';
import { hashLinkSecret, LINK_SECRET_PATTERN } from './one-time';
import { DUMMY_HASH, verifyPassword } from './password';
import { clientAddress, noteSignInAttempt, signInAllowed } from './rate-limit';

/** Shown for any failed password sign-in: it does not say whether the account exists. */
class WrongCredentials extends CredentialsSignin {
  override code = 'credentials';
}
class TooManyAttempts extends CredentialsSignin {
  override code = 'rate_limited';
}
class DeadLink extends CredentialsSignin {
  override code = 'link';
}

const passwordInput = z.object({ email: z.email().max(320), password: z.string().min(1).max(200) });
const linkInput = z.object({ token: z.string().regex(LINK_SECRET_PATTERN) });

const secureCookies = (process.env.APP_URL ?? process.env.AUTH_URL ?? '').startsWith('https://');

const nextAuth: NextAuthResult = NextAuth({
  trustHost: true,
  secret: process.env.AUTH_SECRET,
  session: { strategy: 'jwt', maxAge: 7 * 24 * 3600 },
  // Cookies are httpOnly and SameSite=Lax always, Secure whenever the app is served over https.
  useSecureCookies: secureCookies,
  pages: { signIn: '/sign-in', error: '/sign-in' },
  logger: {
    error: (error) => logger.warn({ err: error.message }, 'auth error'),
    warn: (code) => logger.debug({ code }, 'auth warning'),
    debug: () => {},
  },
  providers: [
    Credentials({
      id: 'password',
      name: 'E-mail and password',
      credentials: { email: {}, password: {} },
      async authorize(raw, request) {
        const parsed = passwordInput.safeParse(raw);
        if (!parsed.success) throw new WrongCredentials();
        const { email, password } = parsed.data;
        const ip = clientAddress(request.headers);
        if (!(await signInAllowed({ email, ip }))) throw new TooManyAttempts();
        const user = await getUserByEmail({ email });
        // Compare against a dummy hash when there is no account, so both paths take as long.
        const ok = await verifyPassword(password, user?.passwordHash ?? DUMMY_HASH);
        await noteSignInAttempt({ email, ip, succeeded: ok && !!user });
        if (!ok || !user) throw new WrongCredentials();
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
    Credentials({
      id: 'email-link',
      name: 'Sign-in link',
      credentials: { token: {} },
      async authorize(raw) {
        const parsed = linkInput.safeParse(raw);
        if (!parsed.success) throw new DeadLink();
        const token = await consumeSignInToken({ tokenHash: hashLinkSecret(parsed.data.token), purpose: 'sign-in' });
        if (!token?.userId) throw new DeadLink();
        const user = await getUserById({ id: token.userId });
        if (!user) throw new DeadLink();
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user?.id) token.uid = user.id;
      return token;
    },
    session({ session, token }) {
      if (typeof token.uid === 'string') session.user.id = token.uid;
      // When the session was issued (seconds), so a password reset can void older sessions.
      return { ...session, issuedAt: typeof token.iat === 'number' ? token.iat : 0 };
    },
  },
});

export const { handlers, auth, signIn, signOut } = nextAuth;
