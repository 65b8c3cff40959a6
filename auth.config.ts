import Credentials from '@auth/core/providers/credentials';
import { CredentialsSignin } from '@auth/core/errors';
import { defineConfig } from 'auth-astro';
import { z } from 'zod';
import { verifyCredentials } from './src/lib/server/signin.ts';
import { endSession, SESSION_MAX_AGE_SEC, startSession } from './src/lib/server/sessions.ts';
import { requestAddress } from './src/lib/server/request-context.ts';

/** Tells the sign-in page to say the account is locked (Auth.js puts `code` in the redirect). */
class AccountLocked extends CredentialsSignin {
  code = 'locked';
}

const credentialsSchema = z.object({
  email: z.string().trim().toLowerCase().email().max(190),
  password: z.string().min(1).max(200),
});

export default defineConfig({
  // Read at run time: auth-astro would otherwise bake import.meta.env in at build time.
  secret: process.env.AUTH_SECRET,
  trustHost: true,
  // One shift. The JWT names a server-side session record (sessions table) that sign-out revokes.
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_SEC },
  pages: { signIn: '/signin', error: '/signin' },
  providers: [
    Credentials({
      credentials: { email: { label: 'Email' }, password: { label: 'Password', type: 'password' } },
      async authorize(raw) {
        const parsed = credentialsSchema.safeParse(raw);
        if (!parsed.success) return null;
        const outcome = await verifyCredentials(parsed.data.email, parsed.data.password, new Date(), requestAddress());
        if (outcome.kind === 'locked') throw new AccountLocked();
        if (outcome.kind !== 'ok') return null;
        return {
          id: String(outcome.user.id),
          email: outcome.user.email,
          name: outcome.user.name,
          role: outcome.user.role,
        };
      },
    }),
  ],
  events: {
    async signOut(message) {
      const sid = 'token' in message ? message.token?.sid : undefined;
      if (typeof sid === 'string') await endSession(sid, requestAddress());
    },
  },
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = (user as { role?: string }).role;
        token.sid = await startSession(Number(user.id), requestAddress());
      }
      return token;
    },
    session({ session, token }) {
      Object.assign(session.user, { id: token.uid, role: token.role });
      return session;
    },
  },
});
