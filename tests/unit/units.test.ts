import { describe, expect, it } from 'vitest';
import { formatEng, parseEng } from '@/lib/units';
import { quantity } from '@/lib/validation/quantity';

describe('parseEng', () => {
  it.each([
    ['100k', 100e3],
    ['1.5k', 1500],
    ['4k7', 4700],
    ['22u', 22e-6],
    ['470n', 470e-9],
    ['2M2', 2.2e6],
    ['-1.5', -1.5],
    ['1e3', 1000],
    ['10 kΩ', 10e3],
    ['22µF', 22e-6],
    ['22μF', 22e-6],
    ['4R7', 4.7],
    ['100R', 100],
    ['10meg', 10e6],
    ['2m', 2e-3],
    ['3M', 3e6],
    ['5 mA', 5e-3],
    ['1kHz', 1000],
    ['.5', 0.5],
    ['  330 V ', 330],
    ['1.5e-3', 1.5e-3],
    ['6p8', 6.8e-12],
    ['-4k7', -4700],
    ['10 ohm', 10],
  ])('%s → %d', (text, value) => {
    const got = parseEng(text);
    expect(got).not.toBeNull();
    expect(got! / value).toBeCloseTo(1, 12);
  });

  it('is exact for sub-unit prefixes (470n is 470/1e9)', () => {
    expect(parseEng('470n')).toBe(470 / 1e9);
    expect(parseEng('22u')).toBe(22 / 1e6);
  });

  it.each(['', ' ', 'k', '4x7', '1.2.3', 'abc', '1,5k', '0x10', 'NaN', 'Infinity', '1e400', '--1', '4k7k', 'k4'])(
    'rejects %j',
    (text) => {
      expect(parseEng(text)).toBeNull();
    },
  );
});

describe('formatEng', () => {
  it.each([
    [4700, 'Ω', '4.7 kΩ'],
    [0.00107, 'A', '1.07 mA'],
    [22e-6, 'F', '22 µF'],
    [1e6, 'Ω', '1 MΩ'],
    [0, 'Ω', '0 Ω'],
    [-1.611, 'V', '-1.61 V'],
    [999.96, 'V', '1 kV'],
    [470e-12, 'F', '470 pF'],
    [123456, 'Hz', '123 kHz'],
    [330, 'V', '330 V'],
    [6.66e-16, 'V', '0 V'],
    [1.5e-13, 'A', '0.15 pA'],
  ])('%d %s → %s', (value, unit, text) => {
    expect(formatEng(value, unit)).toBe(text);
  });

  it('honours the digit count and round-trips through parseEng', () => {
    expect(formatEng(1.07532e-3, 'A', 5)).toBe('1.0753 mA');
    for (const v of [4.7e3, 1.5e-9, 2.2e6, 0.033, 68]) expect(parseEng(formatEng(v, 'Ω'))).toBeCloseTo(v, 15);
  });

  it('never prints NaN', () => {
    expect(formatEng(Number.NaN, 'V')).toBe('– V');
  });
});

describe('quantity()', () => {
  const ohms = quantity('Ω', { positive: true });
  it('parses strings and numbers to numbers', () => {
    expect(ohms.parse('4k7')).toBe(4700);
    expect(ohms.parse(100)).toBe(100);
  });
  it('gives clear messages', () => {
    expect(ohms.safeParse('4x7').error!.issues[0]!.message).toBe("'4x7' is not a number: use e.g. 4k7 or 4700");
    expect(ohms.safeParse(-5).error!.issues[0]!.message).toBe('must be greater than zero');
    expect(ohms.safeParse(Number.POSITIVE_INFINITY).success).toBe(false);
    expect(quantity('V', { max: 0 }).safeParse(2).error!.issues[0]!.message).toBe('must be at most 0 V');
    expect(quantity('V', { min: 1.5e3 }).safeParse('1k').error!.issues[0]!.message).toBe('must be at least 1.5 kV');
  });
  it('records the unit', () => {
    expect(ohms.description).toBe('Ω');
  });
});
