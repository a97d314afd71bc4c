// Signing out ends the session on the server: the token the browser held (or any copy of it) is refused at the
// next request, while the user's other sessions carry on.
import { AuthHandler } from 'next-auth/core';
import { describe, expect, it } from 'vitest';
import { GET as me } from '@/app/api/me/route';
import { authOptions } from '@/lib/auth/options';
import { call, DEMO, DEMO_PASSWORD } from '../support/api';
import { signInWithPassword } from '../support/sign-in';

async function signOut(sessionCookie: string) {
  const [name, value] = sessionCookie.split(/=(.*)/s) as [string, string];
  const headers = { host: 'localhost:3100' };
  const csrf = await AuthHandler({ req: { method: 'GET', action: 'csrf', headers, cookies: {}, query: {} }, options: authOptions });
  const cookies: Record<string, string> = { ...Object.fromEntries((csrf.cookies ?? []).map((c) => [c.name, c.value])), [name]: value };
  const csrfToken = (csrf.body as { csrfToken: string }).csrfToken;
  const res = await AuthHandler({ req: { method: 'POST', action: 'signout', headers, cookies, query: {}, body: { csrfToken } }, options: authOptions });
  // the browser's cookie is cleared
  expect((res.cookies ?? []).some((c) => c.name === name && c.value === '')).toBe(true);
}

describe('sign-out', () => {
  it('the signed-out token no longer works anywhere; another session of the same user does', async () => {
    const first = await signInWithPassword(DEMO.designer, DEMO_PASSWORD, '198.51.100.61');
    const second = await signInWithPassword(DEMO.designer, DEMO_PASSWORD, '198.51.100.62');
    expect(first.ok && second.ok).toBe(true);
    expect((await call(me, { headers: { cookie: first.sessionCookie! } })).status).toBe(200);

    await signOut(first.sessionCookie!);

    const replay = await call(me, { headers: { cookie: first.sessionCookie! } });
    expect(replay.status).toBe(401);
    expect(replay.json.error.code).toBe('unauthorized');
    expect((await call(me, { headers: { cookie: second.sessionCookie! } })).status).toBe(200);
  });

  it('a validly signed token without a server-side session is refused', async () => {
    const { encode } = await import('next-auth/jwt');
    const { User } = await import('@/models');
    const user = (await User.findOne({ where: { email: DEMO.admin } }))!;
    for (const sid of [undefined, '00000000-0000-4000-8000-000000000000', 'not-a-uuid']) {
      const token = await encode({ token: { uid: user.id, role: user.role, sid }, secret: process.env.NEXTAUTH_SECRET! });
      const r = await call(me, { headers: { cookie: `next-auth.session-token=${token}` } });
      expect(r.status, String(sid)).toBe(401);
    }
  });
});
