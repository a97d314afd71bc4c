// Runs next-auth's own credentials flow (CSRF token, then the credentials callback) in-process.
import { AuthHandler } from 'next-auth/core';
import { authOptions } from '@/lib/auth/options';

export type SignInResult = { ok: boolean; error: string | null; sessionCookie: string | null };

// `ip` plays the TCP peer address (the server stamps it as x-anodyne-peer); `extraHeaders` can add what a client or
// a proxy in front would send (X-Forwarded-For).
export async function signInWithPassword(email: string, password: string, ip = '203.0.113.7', extraHeaders: Record<string, string> = {}): Promise<SignInResult> {
  const headers = { host: 'localhost:3100', 'x-anodyne-peer': ip, ...extraHeaders };
  const csrf = await AuthHandler({ req: { method: 'GET', action: 'csrf', headers, cookies: {}, query: {} }, options: authOptions });
  const cookies: Record<string, string> = Object.fromEntries((csrf.cookies ?? []).map((c) => [c.name, c.value]));
  const csrfToken = (csrf.body as { csrfToken: string }).csrfToken;
  const res = await AuthHandler({
    req: {
      method: 'POST',
      action: 'callback',
      providerId: 'credentials',
      headers,
      cookies,
      query: {},
      body: { csrfToken, email, password, json: 'true' },
    },
    options: authOptions,
  });
  const session = (res.cookies ?? []).find((c) => c.name.endsWith('next-auth.session-token'));
  const redirect = res.redirect ?? '';
  const error = redirect.includes('error=') ? decodeURIComponent(new URL(redirect, 'http://localhost').searchParams.get('error') ?? '') : null;
  return { ok: !!session && !error, error, sessionCookie: session ? `${session.name}=${session.value}` : null };
}
