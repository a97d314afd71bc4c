import { describe, expect, it } from 'vitest';
import { formatEng, parseEng } from '@/lib/format/number';
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

describe('CSV files', () => {
  it('names columns by one rule: snake_case quantity, then the SI unit', async () => {
    const { csvColumn, CSV_QUANTITIES } = await import('@/lib/format/csv');
    expect(csvColumn('plateVoltage')).toBe('plate_voltage_V');
    expect(csvColumn('plateCurrent')).toBe('plate_current_A');
    expect(csvColumn('series')).toBe('series');
    const names = (Object.keys(CSV_QUANTITIES) as (keyof typeof CSV_QUANTITIES)[]).map(csvColumn);
    expect(new Set(names).size).toBe(names.length);
    for (const n of names) expect(n).toMatch(/^[a-z]+(_[a-z]+)*(_(V|A|s|Hz|dB|deg))?$/);
  });

  it('writes 6 significant figures, quotes text that needs it and leaves missing values empty', async () => {
    const { writeCsv } = await import('@/lib/format/csv');
    const text = writeCsv(['series', 'plateVoltage', 'plateCurrent'], [
      ['Vg = "-1", bias', 0.1 + 0.2, 1.23456789e-3],
      ['DC load line', Number.NaN, null],
      ['big', 123456789, -4.5e-12],
    ]);
    // RFC 4180 quoting (papaparse): a field holding a comma or a quote is quoted, inner quotes doubled.
    expect(text).toBe('series,plate_voltage_V,plate_current_A\n"Vg = ""-1"", bias",0.3,0.00123457\nDC load line,,\nbig,123457000,-4.5e-12\n');
  });
});

describe('screen values', () => {
  it('never shows NaN or Infinity, and writes negatives with a true minus sign', async () => {
    const { formatMaybe, formatValue, formatDeviation, formatTolerance } = await import('@/lib/format/number');
    expect(formatMaybe(-1.6129, 'V')).toBe('−1.61 V');
    expect(formatMaybe(1.07e-3, 'A')).toBe('1.07 mA');
    for (const bad of [Number.NaN, Infinity, -Infinity, null, undefined]) expect(formatMaybe(bad, 'V')).toBe('–');
    expect(formatValue(12.3456, '%')).toBe('12.35 %');
    expect(formatValue(Number.NaN, 'V')).toBe('–');
    expect(formatValue(true, '')).toBe('yes');
    expect(formatValue(-33.456, '')).toBe('−33.46');
    expect(formatDeviation(0.052)).toBe('+5.2 %');
    expect(formatDeviation(-0.25)).toBe('−25 %');
    expect(formatTolerance(0.1)).toBe('±10 %');
  });
});
