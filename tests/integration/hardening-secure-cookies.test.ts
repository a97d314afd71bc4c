// Served over https (NEXTAUTH_URL https://…), the session cookie is Secure, http-only, SameSite=Lax and carries the
// __Secure- prefix, and the API reads the session from it.
import { AuthHandler } from 'next-auth/core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GET as me } from '@/app/api/me/route';
import { authOptions } from '@/lib/auth/options';
import { call, DEMO, DEMO_PASSWORD } from '../support/api';

const before = process.env.NEXTAUTH_URL;
beforeAll(() => {
  process.env.NEXTAUTH_URL = 'https://anodyne.example';
});
afterAll(() => {
  if (before === undefined) delete process.env.NEXTAUTH_URL;
  else process.env.NEXTAUTH_URL = before;
});

describe('cookies over https', () => {
  it('session and CSRF cookies are Secure with the __Secure-/__Host- prefixes', async () => {
    const headers = { host: 'anodyne.example', 'x-anodyne-peer': '198.51.100.77', 'x-forwarded-proto': 'https' };
    const csrf = await AuthHandler({ req: { method: 'GET', action: 'csrf', headers, cookies: {}, query: {} }, options: authOptions });
    const csrfCookie = (csrf.cookies ?? []).find((c) => c.name.includes('csrf-token'))!;
    expect(csrfCookie.name.startsWith('__Host-')).toBe(true);
    expect(csrfCookie.options.secure).toBe(true);
    const cookies = Object.fromEntries((csrf.cookies ?? []).map((c) => [c.name, c.value]));
    const res = await AuthHandler({
      req: { method: 'POST', action: 'callback', providerId: 'credentials', headers, cookies, query: {}, body: { csrfToken: (csrf.body as { csrfToken: string }).csrfToken, email: DEMO.designer, password: DEMO_PASSWORD, json: 'true' } },
      options: authOptions,
    });
    const session = (res.cookies ?? []).find((c) => c.name.endsWith('next-auth.session-token'))!;
    expect(session.name).toBe('__Secure-next-auth.session-token');
    expect(session.options).toMatchObject({ secure: true, httpOnly: true, sameSite: 'lax' });
    const r = await call(me, { path: 'https://anodyne.example/api/me', headers: { cookie: `${session.name}=${session.value}` } });
    expect(r.status).toBe(200);
  });
});
