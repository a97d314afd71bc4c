import 'server-only';
import type { NextRequest } from 'next/server';
import type { z } from 'zod';
import { can, type Permission } from '@/lib/auth/policy';
import { getRequestUser, type CurrentUser } from '@/lib/auth/session';
import { env } from '@/lib/env';
import { findUnsafeText, UNSAFE_TEXT_MESSAGE } from '@/lib/validation/text';
import { ApiError, toErrorResponse } from './errors';

type RouteParams = Record<string, string | string[] | undefined>;
type Handler<P extends RouteParams> = (req: NextRequest, ctx: { user: CurrentUser; params: P }) => Promise<Response>;

// Every API route goes through this: 401 without a session, 403 without the permission,
// and every thrown error becomes the one error shape.
export function withUser<P extends RouteParams = RouteParams>(permission: Permission, handler: Handler<P>) {
  return async (req: NextRequest, context: { params: Promise<P> }) => {
    try {
      assertSameOrigin(req);
      const user = await getRequestUser(req);
      if (!user) throw new ApiError('unauthorized', 'Sign in to use Anodyne.');
      if (!can(user.role, permission)) throw new ApiError('forbidden', `Your role (${user.role}) may not do this.`);
      const params = (await context.params) ?? ({} as P);
      return await handler(req, { user, params });
    } catch (err) {
      return toErrorResponse(err);
    }
  };
}

/** JSON bodies are small (forms); uploads have their own limits. */
export const MAX_JSON_BYTES = 1024 * 1024;

function megabytes(n: number) {
  return `${Math.round((n / (1024 * 1024)) * 10) / 10} MB`;
}

/**
 * Reads a request body but never more than maxBytes: a declared Content-Length above the limit is refused before
 * anything is read, and a body without one (chunked) is cut off as soon as it passes the limit. 413 either way.
 */
export async function readBodyCapped(req: Request, maxBytes: number, what = 'The request body'): Promise<Buffer> {
  const tooLarge = () => new ApiError('payload_too_large', `${what} is larger than ${megabytes(maxBytes)}.`);
  const declared = req.headers.get('content-length');
  if (declared !== null && /^\d+$/.test(declared.trim()) && Number(declared) > maxBytes) {
    await req.body?.cancel().catch(() => undefined);
    throw tooLarge();
  }
  if (!req.body) return Buffer.alloc(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks, total);
}

/** A multipart body read with readBodyCapped (limit = the largest file plus room for the other fields). */
export async function readFormCapped(req: Request, maxBytes: number, what: string, badMessage: string): Promise<FormData> {
  const type = req.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type)) throw new ApiError('unsupported_media_type', badMessage);
  const bytes = await readBodyCapped(req, maxBytes + 64 * 1024, what);
  try {
    return await new Response(new Uint8Array(bytes), { headers: { 'content-type': type } }).formData();
  } catch {
    throw new ApiError('bad_request', badMessage);
  }
}

const utf8 = new TextDecoder('utf-8', { fatal: true });

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * State changes only from our own pages: a browser marks a request from another site with Sec-Fetch-Site and
 * Origin, and either one pointing elsewhere is a 403. Clients that send neither (scripts, tests) are not browsers
 * acting for a signed-in user, so they pass on to the session check.
 */
export function assertSameOrigin(req: NextRequest) {
  if (SAFE_METHODS.has(req.method.toUpperCase())) return;
  const site = req.headers.get('sec-fetch-site');
  if (site && site !== 'same-origin' && site !== 'none') throw new ApiError('forbidden', 'Requests from other sites may not change anything here.');
  const origin = req.headers.get('origin');
  if (origin === null) return;
  const own = new Set([req.nextUrl.origin]);
  try {
    own.add(new URL(env.APP_URL).origin);
  } catch {
    /* APP_URL is checked at start-up */
  }
  const host = req.headers.get('host');
  if (host) own.add(`${req.nextUrl.protocol}//${host}`);
  if (!own.has(origin)) throw new ApiError('forbidden', 'Requests from other sites may not change anything here.');
}

function assertJsonType(req: Request) {
  const type = (req.headers.get('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
  if (type !== 'application/json') throw new ApiError('unsupported_media_type', 'Send the body as JSON with Content-Type: application/json.');
}

export async function parseBody<S extends z.ZodType>(req: NextRequest, schema: S): Promise<z.output<S>> {
  assertJsonType(req);
  const bytes = await readBodyCapped(req, MAX_JSON_BYTES);
  return parseJsonBytes(bytes, schema);
}

/** A body that may be left out (an empty body reads as {}); when sent, the same rules as parseBody. */
export async function parseOptionalBody<S extends z.ZodType>(req: NextRequest, schema: S): Promise<z.output<S>> {
  const declared = req.headers.get('content-length');
  if (!req.body || declared === '0') return schema.parse({});
  const bytes = await readBodyCapped(req, MAX_JSON_BYTES);
  if (bytes.toString('utf8').trim() === '') return schema.parse({});
  assertJsonType(req);
  return parseJsonBytes(bytes, schema);
}

function parseJsonBytes<S extends z.ZodType>(bytes: Buffer, schema: S): z.output<S> {
  let raw: unknown;
  try {
    raw = JSON.parse(utf8.decode(bytes));
  } catch {
    throw new ApiError('bad_request', 'The request body is not valid JSON.');
  }
  refuseDeepNesting(raw);
  refuseUnsafeText(raw);
  return schema.parse(raw);
}

/** No Anodyne body nests deeper than a few levels; a hostile one thousands deep must not exhaust the stack. */
export const MAX_JSON_DEPTH = 32;

export function refuseDeepNesting(value: unknown) {
  const stack: [unknown, number][] = [[value, 0]];
  while (stack.length) {
    const [v, depth] = stack.pop()!;
    if (!v || typeof v !== 'object') continue;
    if (depth >= MAX_JSON_DEPTH) throw new ApiError('unprocessable_entity', `The request body nests deeper than ${MAX_JSON_DEPTH} levels; no Anodyne input does.`);
    for (const child of Array.isArray(v) ? v : Object.values(v)) if (child && typeof child === 'object') stack.push([child, depth + 1]);
  }
}

export function parseQuery<S extends z.ZodType>(req: NextRequest, schema: S): z.output<S> {
  const query = Object.fromEntries(req.nextUrl.searchParams.entries());
  refuseUnsafeText(query);
  return schema.parse(query);
}

// Backstop for fields a schema takes as unknown (records, passthrough): no NUL or unpaired surrogate reaches
// PostgreSQL, and the answer names the field.
export function refuseUnsafeText(value: unknown) {
  const field = findUnsafeText(value);
  if (field) throw new ApiError('unprocessable_entity', `Invalid input. ${field}: ${UNSAFE_TEXT_MESSAGE}`, { fieldErrors: { [field]: [UNSAFE_TEXT_MESSAGE] } });
}

export function parseParams<S extends z.ZodType>(params: unknown, schema: S): z.output<S> {
  const r = schema.safeParse(params);
  if (!r.success) throw new ApiError('not_found', 'No such record.');
  return r.data;
}
