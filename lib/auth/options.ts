import 'server-only';
import { randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { env } from '@/lib/env';
import { recordAudit } from '@/lib/db/audit';
import { signInSchema } from '@/lib/validation/auth';
import { User, type Role } from '@/models';
import { clientAddress } from './client-address';
import { openSession, revokeSession, SESSION_MAX_AGE_S } from './sessions';
import { assertNotLocked, clearFailures, recordFailure, throttleKeys } from './throttle';

// bcrypt runs for unknown accounts too (against this hash of a random password, same cost as real hashes), so
// the answer takes as long whether or not the account exists.
const DUMMY_HASH = bcrypt.hashSync(randomBytes(16).toString('hex'), 10);

export const authOptions: NextAuthOptions = {
  secret: env.NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) throw new Error('Enter your e-mail address and password.');
        const email = parsed.data.email.toLowerCase();
        const keys = throttleKeys(email, clientAddress(req?.headers as Record<string, string | undefined> | undefined));
        await assertNotLocked(keys);
        const user = await User.findOne({ where: { email } });
        const ok = (await bcrypt.compare(parsed.data.password, user?.passwordHash ?? DUMMY_HASH)) && !!user?.passwordHash;
        if (!user || !ok) {
          await recordFailure(keys);
          throw new Error('That e-mail address and password do not match an account.');
        }
        if (!user.active) throw new Error('This account has been deactivated. Ask an admin to reactivate it.');
        await clearFailures(keys);
        await recordAudit(null, { actorId: user.id, action: 'user.sign-in', targetType: 'user', targetId: user.id });
        return { id: String(user.id), email: user.email, name: user.displayName, role: user.role };
      },
    }),
  ],
  events: {
    // Signing out ends the session on the server too: the token stops working at once, wherever a copy is.
    async signOut({ token }) {
      if (typeof token?.sid === 'string') await revokeSession(token.sid);
    },
  },
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = (user as unknown as { role: Role }).role;
        token.sid = await openSession(token.uid);
      }
      return token;
    },
    async session({ session, token }) {
      if (session.user) {
        session.user.id = token.uid;
        session.user.role = token.role;
      }
      return session;
    },
  },
};
