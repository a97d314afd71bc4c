import 'server-only';
import type { NextRequest } from 'next/server';
import type { z } from 'zod';
import { can, type Permission } from '@/lib/auth/policy';
import { getRequestUser, type CurrentUser } from '@/lib/auth/session';
import { findUnsafeText, UNSAFE_TEXT_MESSAGE } from '@/lib/validation/text';
import { ApiError, toErrorResponse } from './errors';

type RouteParams = Record<string, string | string[] | undefined>;
type Handler<P extends RouteParams> = (req: NextRequest, ctx: { user: CurrentUser; params: P }) => Promise<Response>;

// Every API route goes through this: 401 without a session, 403 without the permission,
// and every thrown error becomes the one error shape.
export function withUser<P extends RouteParams = RouteParams>(permission: Permission, handler: Handler<P>) {
  return async (req: NextRequest, context: { params: Promise<P> }) => {
    try {
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

export async function parseBody<S extends z.ZodType>(req: NextRequest, schema: S): Promise<z.output<S>> {
  let raw: unknown;
  try {
    raw = await req.json();
  } catch {
    throw new ApiError('bad_request', 'The request body is not valid JSON.');
  }
  refuseUnsafeText(raw);
  return schema.parse(raw);
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
