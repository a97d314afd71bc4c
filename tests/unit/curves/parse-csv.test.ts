import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { recogniseHeader } from '@/lib/curves/columns';
import { MAX_REPORTED_ERRORS, parseCurveCsv } from '@/lib/curves/parse-csv';

function triodeCsv(header: string, rows = 24, cell = (k: number) => `${-(k % 4)},${50 + 10 * k},${(0.1 * (k + 1)).toFixed(3)}`): string {
  return [header, ...Array.from({ length: rows }, (_, k) => cell(k))].join('\n');
}

describe('recogniseHeader', () => {
  it.each([
    ['grid_voltage', 'gridVoltage', null],
    ['Grid Voltage', 'gridVoltage', null],
    ['GRID-VOLTAGE', 'gridVoltage', null],
    ['Vg', 'gridVoltage', null],
    ['Vg1 (V)', 'gridVoltage', 'V'],
    ['grid_voltage_v', 'gridVoltage', 'V'],
    ['Va (V)', 'plateVoltage', 'V'],
    ['Ua', 'plateVoltage', null],
    ['anode voltage', 'plateVoltage', null],
    ['plate_current_ma', 'plateCurrent', 'mA'],
    ['Ia (mA)', 'plateCurrent', 'mA'],
    ['Ia [A]', 'plateCurrent', 'A'],
    ['plate-current-A', 'plateCurrent', 'A'],
    ['Vg2', 'screenVoltage', null],
    ['screen voltage', 'screenVoltage', null],
    ['Ig2 (mA)', 'screenCurrent', 'mA'],
    ['screen_current', 'screenCurrent', null],
  ])('%s → %s (unit %s)', (raw, key, unit) => {
    const rec = recogniseHeader(raw);
    expect(rec).toEqual({ recognised: true, key, unit });
  });

  it.each(['plate_curent', 'current', 'temperature', 'Vh', ''])('does not recognise %j', (raw) => {
    expect(recogniseHeader(raw).recognised).toBe(false);
  });

  it('reports an unsupported unit instead of guessing', () => {
    expect(recogniseHeader('Ia (µA)')).toEqual({ recognised: true, key: 'plateCurrent', unit: { unsupported: 'µA' } });
  });
});

describe('parseCurveCsv', () => {
  it('converts mA to A and keeps A as A', () => {
    const ma = parseCurveCsv(triodeCsv('Vg,Va,Ia'), { currentUnit: 'mA' });
    const a = parseCurveCsv(triodeCsv('Vg,Va,Ia'), { currentUnit: 'A' });
    if (!ma.ok || !a.ok) throw new Error('expected ok');
    expect(ma.points[0]?.plateCurrent).toBeCloseTo(0.0001, 12);
    expect(a.points[0]?.plateCurrent).toBeCloseTo(0.1, 12);
    expect(ma.columns).toEqual({ gridVoltage: 'Vg', plateVoltage: 'Va', plateCurrent: 'Ia' });
    expect(ma.kind).toBe('triode');
  });

  it('accepts a header unit that agrees with the chosen current unit', () => {
    const r = parseCurveCsv(triodeCsv('Vg,Va,Ia (A)'), { currentUnit: 'A' });
    expect(r.ok).toBe(true);
  });

  it('names the column, the units involved and the fix when the header unit disagrees', () => {
    const r = parseCurveCsv(triodeCsv('Vg,Va,Ia (mA)'), { currentUnit: 'A' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors).toEqual([
      {
        line: 1,
        column: 'Ia (mA)',
        message: 'Column "Ia (mA)" is in mA, but the upload says currents are in A. Choose mA as the current unit, or correct the header.',
      },
    ]);
  });

  it('counts the header line after leading blank lines and CRLF endings', () => {
    const text = '\r\n\r\n' + triodeCsv('Vg,Va,Ia').split('\n').join('\r\n').replace('-1,60,0.200', '-1,60,abc');
    const r = parseCurveCsv(text, { currentUnit: 'mA' });
    if (r.ok) throw new Error('expected errors');
    // blank, blank, header on line 3, row k on line 4 + k; the bad row is k = 1
    expect(r.errors).toEqual([{ line: 5, column: 'Ia', message: 'Not a number: "abc".' }]);
  });

  it('keeps line numbers right across a quoted field that spans two lines', () => {
    const rows = triodeCsv('Vg,Va,Ia').split('\n');
    rows.splice(3, 0, '"x\ny",55,0.1');
    rows[10] = '-2,999,x';
    const r = parseCurveCsv(rows.join('\n'), { currentUnit: 'mA' });
    if (r.ok) throw new Error('expected errors');
    // The quoted row starts on line 4 and also covers line 5; rows[10] therefore starts on line 12.
    expect(r.errors.map((e) => e.line)).toEqual([4, 12]);
    expect(r.errors[0]?.message).toContain('Not a number');
  });

  it('names both lines of a duplicated operating point', () => {
    const rows = triodeCsv('Vg,Va,Ia').split('\n');
    rows.push(rows[3] ?? '');
    const r = parseCurveCsv(rows.join('\n'), { currentUnit: 'mA' });
    if (r.ok) throw new Error('expected errors');
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0]?.line).toBe(26);
    expect(r.errors[0]?.message).toMatch(/line 26 repeats line 4 \(Vg = -2 V, Va = 70 V\)/);
  });

  it('treats the same voltages at a different screen voltage as a different point', () => {
    const rows = ['Vg1,Va,Vg2,Ia'];
    for (const vg2 of [200, 250]) for (let k = 0; k < 12; k++) rows.push(`-5,${25 * (k + 1)},${vg2},${10 + k}`);
    const r = parseCurveCsv(rows.join('\n'), { currentUnit: 'mA' });
    expect(r.ok && r.kind).toBe('pentode');
  });

  it('stops after the error limit and says how many more there were', () => {
    const r = parseCurveCsv(triodeCsv('Vg,Va,Ia', 50, (k) => `${-k},100,bad`), { currentUnit: 'mA' });
    if (r.ok) throw new Error('expected errors');
    expect(r.errors).toHaveLength(MAX_REPORTED_ERRORS + 1);
    expect(r.errors.at(-1)).toEqual({ line: null, column: null, message: '… and 30 more errors not shown.' });
    expect(r.errors.slice(0, -1).map((e) => e.line)).toEqual(Array.from({ length: 20 }, (_, k) => k + 2));
  });

  it('rejects negative screen current and accepts positive grid voltage', () => {
    const rows = ['Vg1,Va,Vg2,Ia,Ig2'];
    for (let k = 0; k < 22; k++) rows.push(`${k === 0 ? 1 : -k},${100 + k},250,${10 + k},${k === 5 ? -1 : 2}`);
    const r = parseCurveCsv(rows.join('\n'), { currentUnit: 'mA' });
    if (r.ok) throw new Error('expected errors');
    expect(r.errors).toEqual([{ line: 7, column: 'Ig2', message: 'Negative screen current "-1"; currents must be zero or positive.' }]);
  });

  it('warns when currents said to be in A look like mA', () => {
    const r = parseCurveCsv(triodeCsv('Vg,Va,Ia', 24, (k) => `${-(k % 4)},${50 + 10 * k},${5 + k}`), { currentUnit: 'A' });
    expect(r.ok && r.warnings.join(' ')).toMatch(/not in mA/);
  });

  it('round-trips arbitrary finite points through CSV text', () => {
    const point = fc.record({
      vg: fc.double({ min: -100, max: 5, noNaN: true }),
      va: fc.double({ min: 0, max: 1000, noNaN: true }),
      ia: fc.double({ min: 0, max: 500, noNaN: true }),
    });
    fc.assert(
      fc.property(fc.uniqueArray(point, { minLength: 20, maxLength: 60, selector: (p) => `${p.vg}|${p.va}` }), fc.boolean(), (pts, semicolon) => {
        const d = semicolon ? ';' : ',';
        const text = [`grid_voltage${d}plate_voltage${d}plate_current_ma`, ...pts.map((p) => [p.vg, p.va, p.ia].join(d))].join('\n');
        const r = parseCurveCsv(text, { currentUnit: 'mA' });
        if (!r.ok) throw new Error(JSON.stringify(r.errors.slice(0, 2)));
        r.points.forEach((q, i) => {
          const p = pts[i];
          expect(q.gridVoltage).toBe(p?.vg === 0 ? 0 : p?.vg);
          expect(q.plateVoltage).toBe(p?.va === 0 ? 0 : p?.va);
          expect(q.plateCurrent).toBeCloseTo((p?.ia ?? NaN) / 1000, 12);
        });
      }),
      { numRuns: 60, seed: 42 },
    );
  });
});
