// Security headers on pages and API answers (set by proxy.ts): a per-request CSP nonce that Next receives with the
// request, frame-ancestors 'none', nosniff, a Referrer-Policy, and HSTS + upgrade-insecure-requests over https.
// The browser side (no CSP violation in the console on the production build) is checked by
// tests/e2e/security-headers.spec.ts.
import { NextRequest, type NextFetchEvent } from 'next/server';
import { describe, expect, it } from 'vitest';
import proxy from '@/proxy';
import { sessionCookie, DEMO } from '../support/api';

async function through(path: string, headers: Record<string, string> = {}) {
  const res = await proxy(new NextRequest(new URL(path, 'http://localhost:3100'), { headers }), {} as NextFetchEvent);
  return res as Response;
}

function directives(csp: string) {
  return Object.fromEntries(csp.split(';').map((d) => d.trim().split(/\s+/)).map(([k, ...v]) => [k!, v]));
}

describe('security headers', () => {
  it('a signed-in page gets a CSP with a fresh nonce that Next also receives with the request', async () => {
    const cookie = await sessionCookie(DEMO.designer);
    const a = await through('/projects', { cookie });
    const b = await through('/projects', { cookie });
    const csp = a.headers.get('content-security-policy')!;
    expect(csp).toBeTruthy();
    const d = directives(csp);
    const nonce = d['script-src']!.find((s) => s.startsWith("'nonce-"))!;
    expect(nonce).toMatch(/^'nonce-[A-Za-z0-9+/=]{20,}'$/);
    expect(d['script-src']).not.toContain("'unsafe-inline'");
    expect(d['frame-ancestors']).toEqual(["'none'"]);
    expect(d['object-src']).toEqual(["'none'"]);
    expect(b.headers.get('content-security-policy')).not.toBe(csp);
    // NextResponse.next({ request: { headers } }) hands the nonce and the policy to the renderer
    expect(a.headers.get('x-middleware-request-x-nonce')).toBe(nonce.slice(7, -1));
    expect(a.headers.get('x-middleware-request-content-security-policy')).toBe(csp);
    expect(a.headers.get('x-content-type-options')).toBe('nosniff');
    expect(a.headers.get('referrer-policy')).toBe('strict-origin-when-cross-origin');
    expect(a.headers.get('x-frame-options')).toBe('DENY');
  });

  it('public pages, the sign-in redirect and API answers carry the headers too', async () => {
    for (const path of ['/sign-in', '/projects', '/api/projects', '/api/auth/session', '/invitations/abc']) {
      const res = await through(path);
      const csp = res.headers.get('content-security-policy') ?? '';
      expect(csp, path).toMatch(/frame-ancestors 'none'/);
      expect(res.headers.get('x-content-type-options'), path).toBe('nosniff');
      expect(res.headers.get('referrer-policy'), path).toBeTruthy();
    }
    const api = await through('/api/projects');
    expect(api.headers.get('content-security-policy')).toMatch(/default-src 'none'/);
  });

  it('over https: Strict-Transport-Security and upgrade-insecure-requests', async () => {
    const res = await proxy(new NextRequest('https://anodyne.example/sign-in'), {} as NextFetchEvent) as Response;
    expect(res.headers.get('strict-transport-security')).toMatch(/max-age=\d+/);
    expect(res.headers.get('content-security-policy')).toMatch(/upgrade-insecure-requests/);
    const plain = await through('/sign-in');
    expect(plain.headers.get('strict-transport-security')).toBeNull();
  });
});
