import 'server-only';
import { NextResponse } from 'next/server';
import { ConnectionError, DatabaseError, ForeignKeyConstraintError, TimeoutError, UniqueConstraintError } from 'sequelize';
import { ZodError } from 'zod';
import { CalcError } from '@/lib/calc';

export const ERROR_STATUS = {
  bad_request: 400,
  unauthorized: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  payload_too_large: 413,
  unsupported_media_type: 415,
  unprocessable_entity: 422,
  too_many_requests: 429,
  internal_error: 500,
  service_unavailable: 503,
} as const;
export type ErrorCode = keyof typeof ERROR_STATUS;

export type ErrorBody = {
  error: { code: ErrorCode | string; message: string; fieldErrors?: Record<string, string[]>; details?: unknown };
};

export class ApiError extends Error {
  readonly code: ErrorCode;
  readonly fieldErrors?: Record<string, string[]>;
  readonly details?: unknown;
  constructor(code: ErrorCode, message: string, extra?: { fieldErrors?: Record<string, string[]>; details?: unknown }) {
    super(message);
    this.code = code;
    this.fieldErrors = extra?.fieldErrors;
    this.details = extra?.details;
  }
}

export function zodFieldErrors(err: ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.map(String).join('.') : '_';
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

export function errorResponse(code: ErrorCode | string, message: string, status: number, extra?: Omit<ErrorBody['error'], 'code' | 'message'>) {
  return NextResponse.json<ErrorBody>({ error: { code, message, ...extra } }, { status });
}

// SQLSTATE classes and socket errors that mean "PostgreSQL cannot be reached right now", not "this request is wrong".
const UNAVAILABLE_CODES = new Set(['57P01', '57P02', '57P03', '53300', '53400', 'ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'EHOSTUNREACH', 'ENOTFOUND', 'EAI_AGAIN']);
const UNAVAILABLE_MESSAGE = /Connection terminated|connection timeout|timeout exceeded when trying to connect|Client has encountered a connection error|the database system is (starting up|shutting down|in recovery)|terminating connection/i;

/** True when the error says the database is unreachable or going away (a retry later may well succeed). */
export function isDatabaseUnavailable(err: unknown): boolean {
  if (err instanceof ConnectionError || err instanceof TimeoutError) return true;
  for (let e: unknown = err, depth = 0; e && typeof e === 'object' && depth < 4; depth++) {
    const { code, message } = e as { code?: unknown; message?: unknown };
    if (typeof code === 'string' && (code.startsWith('08') || UNAVAILABLE_CODES.has(code))) return true;
    if (typeof message === 'string' && UNAVAILABLE_MESSAGE.test(message)) return true;
    e = (e as { parent?: unknown; original?: unknown; cause?: unknown }).parent ?? (e as { original?: unknown }).original ?? (e as { cause?: unknown }).cause;
  }
  return false;
}

export const RETRY_AFTER_SECONDS = 5;

export function toErrorResponse(err: unknown) {
  if (isDatabaseUnavailable(err)) {
    console.warn('[api] database unavailable:', (err as Error)?.message);
    const res = errorResponse('service_unavailable', 'Anodyne is temporarily unavailable. Nothing you saved is lost; try again in a few seconds.', 503);
    res.headers.set('Retry-After', String(RETRY_AFTER_SECONDS));
    return res;
  }
  if (err instanceof ApiError) {
    return errorResponse(err.code, err.message, ERROR_STATUS[err.code], { fieldErrors: err.fieldErrors, details: err.details });
  }
  if (err instanceof ZodError) {
    const fieldErrors = zodFieldErrors(err);
    const first = err.issues[0];
    const where = first?.path.length ? `${first.path.join('.')}: ` : '';
    return errorResponse('unprocessable_entity', `Invalid input. ${where}${first?.message ?? ''}`.trim(), 422, { fieldErrors });
  }
  if (err instanceof CalcError) {
    return errorResponse(`calc_${err.code}`, err.message, 422);
  }
  if (err instanceof UniqueConstraintError) {
    return errorResponse('conflict', 'That record already exists.', 409);
  }
  if (err instanceof ForeignKeyConstraintError) {
    return errorResponse('conflict', 'That record is referenced by or refers to something that does not exist.', 409);
  }
  if (err instanceof DatabaseError && (err.parent as { code?: string } | undefined)?.code === '23514') {
    return errorResponse('conflict', err.message.replace(/^.*?: /, ''), 409);
  }
  if (err instanceof SyntaxError) {
    return errorResponse('bad_request', 'The request body is not valid JSON.', 400);
  }
  console.error('[api] unhandled error', err);
  return errorResponse('internal_error', 'Something went wrong on our side. The error has been logged.', 500);
}
