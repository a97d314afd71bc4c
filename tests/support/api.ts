// In-process calls to route handlers with a real session token, against the real test database.
import { encode } from 'next-auth/jwt';
import { NextRequest } from 'next/server';
import { User } from '@/models';
import '@/lib/db';
import { openSession } from '@/lib/auth/sessions';

export const DEMO = {
  admin: 'admin@anodyne.test',
  designer: 'designer@anodyne.test',
  technician: 'technician@anodyne.test',
  reviewer: 'reviewer@anodyne.test',
} as const;
export type DemoRole = keyof typeof DEMO;
export const DEMO_PASSWORD = process.env.DEMO_PASSWORD ?? 'anodyne-demo';

export async function sessionCookie(email: string) {
  const user = await User.findOne({ where: { email } });
  if (!user) throw new Error(`no user ${email}`);
  const sid = await openSession(user.id);
  const token = await encode({ token: { uid: user.id, role: user.role, email: user.email, name: user.displayName, sid }, secret: process.env.NEXTAUTH_SECRET! });
  return `next-auth.session-token=${token}`;
}

type AnyHandler = (req: NextRequest, ctx: { params: Promise<any> }) => Promise<Response>;

export type CallOptions = {
  method?: string;
  path?: string;
  body?: unknown;
  form?: FormData;
  as?: DemoRole | { email: string } | null;
  params?: Record<string, string>;
  headers?: Record<string, string>;
};

export async function call(handler: AnyHandler, opts: CallOptions = {}) {
  const headers = new Headers(opts.headers);
  if (opts.as) headers.set('cookie', await sessionCookie(typeof opts.as === 'string' ? DEMO[opts.as] : opts.as.email));
  let body: BodyInit | undefined;
  if (opts.form) body = opts.form;
  else if (opts.body !== undefined) {
    if (!headers.has('content-type')) headers.set('content-type', 'application/json');
    body = typeof opts.body === 'string' ? opts.body : JSON.stringify(opts.body);
  }
  const req = new NextRequest(new URL(opts.path ?? '/', 'http://localhost:3100'), { method: opts.method ?? 'GET', headers, body });
  const res = await handler(req, { params: Promise.resolve(opts.params ?? {}) });
  const type = res.headers.get('content-type') ?? '';
  const json = type.includes('application/json') ? await res.json() : null;
  return { status: res.status, json, res };
}

export async function sinkMessages(): Promise<{ id: string; to: string[]; subject: string; text: string; html: string; attachments: { filename: string; contentType: string; size: number; contentBase64?: string }[] }[]> {
  const res = await fetch(`${process.env.MAIL_SINK_URL}/messages?full=1`);
  return ((await res.json()) as { messages: never[] }).messages;
}

export async function waitFor<T>(fn: () => Promise<T | null | undefined | false>, timeoutMs = 8000, everyMs = 100): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error('timed out waiting');
    await new Promise((r) => setTimeout(r, everyMs));
  }
}
