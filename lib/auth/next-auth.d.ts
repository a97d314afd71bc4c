import type { Role } from '@/models/user';

declare module 'next-auth' {
  interface Session {
    user: { id: number; role: Role; name?: string | null; email?: string | null };
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    uid: number;
    role: Role;
    /** user_sessions row of this sign-in */
    sid?: string;
  }
}
