import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { fitKorenTriode } from '@/lib/calc/fit';
import { DEMO_12AX7_PARAMS, makeDemoCurvesCsv } from '@/lib/curves/demo-curves';
import { parseCurveCsv } from '@/lib/curves/parse-csv';

const committed = readFileSync(path.resolve(__dirname, '../../../seeders/data/demo-12ax7-curves.csv'), 'utf8');

describe('demo 12AX7-class curve set', () => {
  it('is exactly what scripts/make-demo-curves.ts generates (seeded, so reproducible)', () => {
    expect(committed).toBe(makeDemoCurvesCsv());
  });

  it('has the agreed header, grid steps and plate range', () => {
    expect(committed.split('\n')[0]).toBe('grid_voltage,plate_voltage,plate_current_ma');
    const r = parseCurveCsv(committed, { currentUnit: 'mA' });
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    expect(r.kind).toBe('triode');
    const grids = [...new Set(r.points.map((p) => p.gridVoltage))].sort((a, b) => a - b);
    expect(grids).toEqual([-4, -3.5, -3, -2.5, -2, -1.5, -1, -0.5, 0]);
    const vas = r.points.map((p) => p.plateVoltage);
    expect(Math.min(...vas)).toBe(0);
    expect(Math.max(...vas)).toBe(400);
    expect(r.points).toHaveLength(9 * 41);
  });

  it('fits back to close to the Koren 1996 12AX7 set it was made from, with about 1.5 % scatter', () => {
    const r = parseCurveCsv(committed, { currentUnit: 'mA' });
    if (!r.ok) throw new Error('demo CSV must parse');
    const fit = fitKorenTriode(r.points);
    expect(fit.rmsErrorPercent).toBeGreaterThan(1);
    expect(fit.rmsErrorPercent).toBeLessThan(2.5);
    expect(Math.abs(fit.parameters.mu / DEMO_12AX7_PARAMS.mu - 1)).toBeLessThan(0.03);
    expect(Math.abs(fit.parameters.ex / DEMO_12AX7_PARAMS.ex - 1)).toBeLessThan(0.03);
  });
});
