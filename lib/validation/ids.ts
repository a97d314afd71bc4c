import { z } from 'zod';

/** Ids are PostgreSQL `integer` serials: 1 … 2^31 − 1. */
export const ID_MAX = 2_147_483_647;
const DECIMAL_ID = /^[1-9][0-9]{0,9}$/;

/** True for a path/query text that is a record id: plain decimal digits, no sign, blanks, exponent or hex. */
export function isIdText(s: string): boolean {
  return DECIMAL_ID.test(s) && Number(s) <= ID_MAX;
}

/** A record id read from text (path segment, query string): strict decimal 1 … 2^31 − 1. */
export function idText(message = 'Not a valid id.') {
  return z
    .string({ message })
    .refine(isIdText, { message })
    .transform((s) => Number(s));
}

/** A record id in a JSON body: an integer 1 … 2^31 − 1. */
export function idNumber(message = 'Not a valid id.') {
  return z.number({ message }).int(message).min(1, message).max(ID_MAX, message);
}

/** A positive integer counter kept in an `integer` column (record versions, positions). */
export function intCounter(message = 'Not a valid number.') {
  return z.number({ message }).int(message).min(1, message).max(ID_MAX, message);
}

/** Page-side parse of a route segment: the id, or null when the text is no id (the page answers 404). */
export function pageId(s: string | undefined): number | null {
  return s !== undefined && isIdText(s) ? Number(s) : null;
}
