import Credentials from '@auth/core/providers/credentials';
import { CredentialsSignin } from '@auth/core/errors';
import { defineConfig } from 'auth-astro';
import { z } from 'zod';
import { verifyCredentials } from './src/lib/server/signin.ts';

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
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 }, // one shift
  pages: { signIn: '/signin', error: '/signin' },
  providers: [
    Credentials({
      credentials: { email: { label: 'Email' }, password: { label: 'Password', type: 'password' } },
      async authorize(raw) {
        const parsed = credentialsSchema.safeParse(raw);
        if (!parsed.success) return null;
        const outcome = await verifyCredentials(parsed.data.email, parsed.data.password, new Date());
        if (outcome.kind === 'locked') throw new AccountLocked();
        if (outcome.kind !== 'ok') return null;
        return { id: String(outcome.user.id), email: outcome.user.email, name: outcome.user.name, role: outcome.user.role };
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = (user as { role?: string }).role;
      }
      return token;
    },
    session({ session, token }) {
      Object.assign(session.user, { id: token.uid, role: token.role });
      return session;
    },
  },
});
