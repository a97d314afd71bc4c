import 'server-only';
import bcrypt from 'bcryptjs';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { env } from '@/lib/env';
import { recordAudit } from '@/lib/db/audit';
import { signInSchema } from '@/lib/validation/auth';
import { User, type Role } from '@/models';
import { assertNotLocked, clearFailures, recordFailure, throttleKeys } from './throttle';

function clientIp(headers: Record<string, string | string[] | undefined> | undefined): string | null {
  const fwd = headers?.['x-forwarded-for'];
  const first = (Array.isArray(fwd) ? fwd[0] : fwd)?.split(',')[0]?.trim();
  const real = headers?.['x-real-ip'];
  return first || (Array.isArray(real) ? real[0] : real) || null;
}

export const authOptions: NextAuthOptions = {
  secret: env.NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) throw new Error('Enter your e-mail address and password.');
        const email = parsed.data.email.toLowerCase();
        const keys = throttleKeys(email, clientIp(req?.headers));
        await assertNotLocked(keys);
        const user = await User.findOne({ where: { email } });
        const ok = user?.passwordHash ? await bcrypt.compare(parsed.data.password, user.passwordHash) : false;
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
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = (user as unknown as { role: Role }).role;
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
