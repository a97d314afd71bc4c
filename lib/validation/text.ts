import { z } from 'zod';

// PostgreSQL text cannot hold U+0000, and an unpaired UTF-16 surrogate has no UTF-8 form (the driver would
// store U+FFFD in its place): such text is refused with a field error rather than failing or being altered.
const UNSAFE = /\u0000|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export const UNSAFE_TEXT_MESSAGE = 'Remove the NUL character or the broken Unicode character (unpaired surrogate) from this text.';

export function isSafeText(s: string): boolean {
  return !UNSAFE.test(s);
}

/** Every text field: a zod string that refuses NUL and unpaired surrogates. Chain .trim(), .max() etc. as usual. */
export function text(params?: Parameters<typeof z.string>[0]) {
  return z.string(params).refine(isSafeText, { message: UNSAFE_TEXT_MESSAGE });
}

/** Dotted path of the first string (value or object key) in a parsed JSON value that is not safe text, else null. */
export function findUnsafeText(value: unknown, path: string[] = []): string | null {
  if (typeof value === 'string') return isSafeText(value) ? null : path.join('.') || '_';
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const hit = findUnsafeText(value[i], [...path, String(i)]);
      if (hit) return hit;
    }
    return null;
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      if (!isSafeText(k)) return [...path, k.replace(UNSAFE, '?')].join('.');
      const hit = findUnsafeText(v, [...path, k]);
      if (hit) return hit;
    }
  }
  return null;
}
