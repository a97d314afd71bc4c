import { withAuth } from 'next-auth/middleware';
import { NextResponse, type NextFetchEvent, type NextRequest } from 'next/server';
import { API_CSP, applySecurityHeaders, contentSecurityPolicy, makeNonce } from '@/lib/security/headers';

const dev = process.env.NODE_ENV === 'development';

function isHttps(req: NextRequest): boolean {
  return req.nextUrl.protocol === 'https:' || (process.env.APP_URL ?? '').startsWith('https://');
}

// Every page gets a fresh CSP nonce: Next reads it from the request's Content-Security-Policy header and puts it
// on its own inline scripts; the root layout passes it on (next-themes' script).
function secured(req: NextRequest): NextResponse {
  const https = isHttps(req);
  if (req.nextUrl.pathname.startsWith('/api/')) {
    const res = NextResponse.next();
    applySecurityHeaders(res.headers, API_CSP, https);
    return res;
  }
  const nonce = makeNonce();
  const csp = contentSecurityPolicy(nonce, { dev, https });
  const requestHeaders = new Headers(req.headers);
  requestHeaders.set('x-nonce', nonce);
  requestHeaders.set('Content-Security-Policy', csp);
  const res = NextResponse.next({ request: { headers: requestHeaders } });
  applySecurityHeaders(res.headers, csp, https);
  return res;
}

// Early redirect for signed-out visitors; the real checks (role, active account) run again in every
// page and route handler.
const signedIn = withAuth((req) => secured(req), { pages: { signIn: '/sign-in' } });
const PUBLIC = /^\/(api|sign-in|invitations|forbidden)(\/|$)/;

/** A path with a malformed %-escape (e.g. %ED%A0%80, an unpaired surrogate) cannot name any record: 400, not 500. */
function malformedPath(pathname: string): boolean {
  try {
    decodeURIComponent(pathname);
    return false;
  } catch {
    return true;
  }
}

export default async function proxy(req: NextRequest, event: NextFetchEvent) {
  if (malformedPath(req.nextUrl.pathname)) {
    const message = 'The address is not valid: it contains a malformed %-escape.';
    const res = req.nextUrl.pathname.startsWith('/api/')
      ? NextResponse.json({ error: { code: 'bad_request', message } }, { status: 400 })
      : new NextResponse(message, { status: 400, headers: { 'content-type': 'text/plain; charset=utf-8' } });
    applySecurityHeaders(res.headers, API_CSP, isHttps(req));
    return res;
  }
  if (PUBLIC.test(req.nextUrl.pathname)) return secured(req);
  const res = await signedIn(req as Parameters<typeof signedIn>[0], event);
  // a redirect to the sign-in page carries the headers too
  if (res instanceof Response && !res.headers.has('Content-Security-Policy')) applySecurityHeaders(res.headers, API_CSP, isHttps(req));
  return res;
}

export const config = {
  matcher: ['/((?!_next/static|_next/image|fonts|favicon.ico|icon.svg).*)'],
};
