// Gains and multipliers reach the screen without scientific notation ("× 3.945e+4" was seen in the chain view).
import { describe, expect, it } from 'vitest';
import { formatRatio } from '@/lib/format/number';

describe('formatRatio', () => {
  it('writes plain figures between 0.001 and 1000 and an SI prefix beyond, with a true minus sign', () => {
    expect(formatRatio(39450)).toBe('39.5 k');
    expect(formatRatio(1710)).toBe('1.71 k');
    expect(formatRatio(-57.3)).toBe('−57.3');
    expect(formatRatio(0.985)).toBe('0.985');
    expect(formatRatio(100)).toBe('100');
    expect(formatRatio(NaN)).toBe('–');
    for (const v of [3.945e4, 1.71e3, 2.5e-5, 7e9]) expect(formatRatio(v)).not.toMatch(/e[+-]/);
  });
});
