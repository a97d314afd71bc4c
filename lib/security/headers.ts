// Response headers every page and API answer carries. Pure (no Node-only APIs): proxy.ts runs it per request.

/** A fresh per-request nonce for the Content-Security-Policy (16 random bytes, base64). */
export function makeNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  let s = '';
  for (const b of bytes) s += String.fromCharCode(b);
  return btoa(s);
}

/**
 * Scripts only from our origin or carrying this request's nonce ('strict-dynamic' lets Next's nonced loader pull
 * its chunks). Styles allow inline attributes: React and the charts set style="" on elements, and a style cannot
 * run code. Nothing may frame the app.
 */
export function contentSecurityPolicy(nonce: string, opts: { dev?: boolean; https?: boolean } = {}): string {
  const directives = [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${opts.dev ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' blob: data:",
    "font-src 'self' data:",
    `connect-src 'self'${opts.dev ? ' ws: wss:' : ''}`,
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    "frame-src 'self' blob:",
    // the stage editor runs the engine in a Web Worker loaded from our origin
    "worker-src 'self' blob:",
    ...(opts.https ? ['upgrade-insecure-requests'] : []),
  ];
  return directives.join('; ');
}

/** The API answers JSON, PDF and CSV: nothing in them may run or be framed. */
export const API_CSP = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

export const STATIC_SECURITY_HEADERS: Record<string, string> = {
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'strict-origin-when-cross-origin',
  'X-Frame-Options': 'DENY',
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Permissions-Policy': 'camera=(), microphone=(), geolocation=(), payment=(), usb=()',
};

export function applySecurityHeaders(headers: Headers, csp: string, https: boolean) {
  headers.set('Content-Security-Policy', csp);
  for (const [k, v] of Object.entries(STATIC_SECURITY_HEADERS)) headers.set(k, v);
  if (https) headers.set('Strict-Transport-Security', 'max-age=31536000');
}
