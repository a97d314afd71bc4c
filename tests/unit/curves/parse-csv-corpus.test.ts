import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { MAX_REPORTED_ERRORS, parseCurveCsv } from '@/lib/curves/parse-csv';
import type { CurrentUnit, CurvePoint } from '@/lib/curves/types';

const root = path.resolve(__dirname, '../../fixtures/csv');

type BadExpectation = {
  currentUnit: CurrentUnit;
  line: number | null;
  column: string | null;
  message: string;
  errorCount?: number;
};
type GoodExpectation = {
  currentUnit: CurrentUnit;
  kind: 'triode' | 'pentode';
  points: number;
  delimiter: string;
  warnings?: number;
  first: CurvePoint;
};

const readJson = <T>(file: string): Record<string, T> => JSON.parse(readFileSync(file, 'utf8')) as Record<string, T>;
const badExpected = readJson<BadExpectation>(path.join(root, 'bad/expected.json'));
const goodExpected = readJson<GoodExpectation>(path.join(root, 'good/expected.json'));
const csvFiles = (dir: string) => readdirSync(path.join(root, dir)).filter((f) => f.endsWith('.csv')).sort();

describe('bad CSV corpus', () => {
  it('has at least 20 files and an expectation for every one of them', () => {
    const files = csvFiles('bad');
    expect(files.length).toBeGreaterThanOrEqual(20);
    expect(Object.keys(badExpected).sort()).toEqual(files);
  });

  it.each(Object.entries(badExpected))('%s is rejected with the expected line, column and message', (file, exp) => {
    const text = readFileSync(path.join(root, 'bad', file), 'utf8');
    const result = parseCurveCsv(text, { currentUnit: exp.currentUnit });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    const match = result.errors.find(
      (e) => e.line === exp.line && e.column === exp.column && e.message.includes(exp.message),
    );
    expect(match, JSON.stringify(result.errors, null, 1)).toBeDefined();
    if (exp.errorCount !== undefined) expect(result.errors).toHaveLength(exp.errorCount);
    expect(result.errors.length).toBeLessThanOrEqual(MAX_REPORTED_ERRORS + 1);
  });
});

describe('good CSV corpus', () => {
  it('has an expectation for every file', () => {
    expect(Object.keys(goodExpected).sort()).toEqual(csvFiles('good'));
  });

  it.each(Object.entries(goodExpected))('%s parses to the expected points', (file, exp) => {
    const text = readFileSync(path.join(root, 'good', file), 'utf8');
    const result = parseCurveCsv(text, { currentUnit: exp.currentUnit });
    if (!result.ok) throw new Error(JSON.stringify(result.errors));
    expect(result.kind).toBe(exp.kind);
    expect(result.points).toHaveLength(exp.points);
    expect(result.delimiter).toBe(exp.delimiter);
    expect(result.warnings).toHaveLength(exp.warnings ?? 0);
    const first = result.points[0];
    expect(first).toBeDefined();
    if (!first) return;
    expect(Object.keys(first).sort()).toEqual(Object.keys(exp.first).sort());
    for (const [key, value] of Object.entries(exp.first) as [keyof CurvePoint, number][]) {
      const got = first[key] ?? NaN;
      // Files round to 4 decimals in mA or 5 significant digits in A.
      expect(Math.abs(got - value)).toBeLessThanOrEqual(Math.abs(value) * 1e-4 + 1e-12);
    }
    for (const p of result.points) {
      expect(p.plateCurrent).toBeGreaterThanOrEqual(0);
      expect(p.plateCurrent).toBeLessThan(1); // all fixtures are far below 1 A once converted
    }
  });

  it('reads the same points from the mA, A, semicolon, BOM/CRLF, tab and short-header variants', () => {
    const parse = (file: string, unit: CurrentUnit) => {
      const r = parseCurveCsv(readFileSync(path.join(root, 'good', file), 'utf8'), { currentUnit: unit });
      if (!r.ok) throw new Error(file);
      return r.points;
    };
    const base = parse('basic-triode-ma.csv', 'mA');
    for (const [file, unit] of [
      ['triode-amps.csv', 'A'],
      ['semicolon-decimal-comma.csv', 'mA'],
      ['bom-crlf.csv', 'mA'],
      ['tabs.csv', 'mA'],
      ['short-names-units.csv', 'mA'],
      ['blank-lines-reordered.csv', 'mA'],
    ] as const) {
      const other = parse(file, unit);
      expect(other).toHaveLength(base.length);
      other.forEach((p, i) => {
        const b = base[i];
        expect(p.gridVoltage).toBe(b?.gridVoltage);
        expect(p.plateVoltage).toBe(b?.plateVoltage);
        expect(Math.abs(p.plateCurrent - (b?.plateCurrent ?? NaN))).toBeLessThanOrEqual(1e-7 + 1e-4 * p.plateCurrent) // 4 decimals in mA = 0.05 µA;
      });
    }
  });
});
