import { z } from 'zod';
import { formatEng, parseEng } from '../format/number';

export type QuantityOptions = {
  min?: number;
  max?: number;
  /** strictly greater than zero */
  positive?: boolean;
  /** strictly less than zero */
  negative?: boolean;
};

/**
 * A numeric field that accepts a finite number or an engineering-notation string ('4k7', '22µF')
 * and outputs a number in SI units. The unit is recorded in the description and in `.meta({ unit })`.
 */
export function quantity(unit: string, options: QuantityOptions = {}) {
  const label = (v: number) => formatEng(v, unit, 4);
  let num = z.number();
  if (options.positive) num = num.gt(0, { message: 'must be greater than zero' });
  if (options.negative) num = num.lt(0, { message: 'must be negative' });
  if (options.min !== undefined) num = num.gte(options.min, { message: `must be at least ${label(options.min)}` });
  if (options.max !== undefined) num = num.lte(options.max, { message: `must be at most ${label(options.max)}` });
  return z
    .union([z.number(), z.string()], { message: 'must be a number' })
    .transform((value, ctx) => {
      if (typeof value === 'number') {
        if (Number.isFinite(value)) return value;
        ctx.addIssue({ code: 'custom', message: 'must be a finite number' });
        return z.NEVER;
      }
      if (value.trim() === '') {
        ctx.addIssue({ code: 'custom', message: 'required' });
        return z.NEVER;
      }
      const parsed = parseEng(value);
      if (parsed === null) {
        ctx.addIssue({ code: 'custom', message: `'${value}' is not a number: use e.g. 4k7 or 4700` });
        return z.NEVER;
      }
      return parsed;
    })
    .pipe(num)
    .describe(unit === '' ? 'dimensionless' : unit)
    .meta({ unit });
}
