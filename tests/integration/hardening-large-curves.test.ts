// A large curve file the limits accept (130,000 points, under 5 MB) is stored, read back, plotted and fitted.
// The points are generated from Koren's triode equation with his published 12AX7 set (Koren 1996, Glass Audio
// 8(5): µ 100, Ex 1.4, Kg1 1060, Kp 600, Kvb 300), so the fit must land back near those parameters.
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as upload } from '@/app/api/tubes/[id]/curve-sets/route';
import { GET as getSet } from '@/app/api/curve-sets/[id]/route';
import { POST as fit } from '@/app/api/curve-sets/[id]/fit/route';
import { TubeType } from '@/models';
import { call } from '../support/api';

const K = { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 };
function korenIa(va: number, vg: number) {
  const e1 = (va / K.kp) * Math.log1p(Math.exp(K.kp * (1 / K.mu + vg / Math.sqrt(K.kvb + va * va))));
  return e1 > 0 ? (2 * e1 ** K.ex) / K.kg1 : 0;
}

let csv = '';
let tubeId = '';
const GRIDS = 13;
const PER_GRID = 10_000;

beforeAll(async () => {
  tubeId = String((await TubeType.findOne({ where: { designation: '12AX7' } }))!.id);
  const lines = ['grid_voltage,plate_voltage,plate_current_ma'];
  for (let g = 0; g < GRIDS; g++) {
    const vg = -0.5 * g;
    for (let i = 1; i <= PER_GRID; i++) {
      const va = (400 * i) / PER_GRID;
      lines.push(`${vg},${va.toFixed(3)},${(korenIa(va, vg) * 1e3).toFixed(5)}`);
    }
  }
  csv = lines.join('\n') + '\n';
});

describe('large curve files', () => {
  it('130,000 points under the size limit: stored, read back, plotted and fitted', async () => {
    expect(Buffer.byteLength(csv)).toBeLessThan(5 * 1024 * 1024);
    const f = new FormData();
    f.set('file', new File([csv], 'dense-12ax7.csv', { type: 'text/csv' }));
    f.set('currentUnit', 'mA');
    const t0 = performance.now();
    const up = await call(upload, { as: 'designer', method: 'POST', params: { id: tubeId }, form: f });
    expect(up.status, JSON.stringify(up.json?.error)).toBe(201);
    const setId = String(up.json.curveSet.id);
    expect(up.json.curveSet.pointCount).toBe(GRIDS * PER_GRID);

    const t1 = performance.now();
    const read = await call(getSet, { as: 'designer', params: { id: setId } });
    expect(read.status, JSON.stringify(read.json?.error)).toBe(200);
    // the plot carries every grid voltage, thinned to what a chart can draw
    expect(new Set(read.json.measured.map((p: { vg: number }) => p.vg)).size).toBe(GRIDS);
    expect(read.json.measured.length).toBeLessThanOrEqual(10_000);
    expect(read.json.vaMax).toBeCloseTo(400, 0);

    const t2 = performance.now();
    const fitted = await call(fit, { as: 'designer', method: 'POST', params: { id: setId }, body: { model: 'koren-triode' } });
    expect(fitted.status, JSON.stringify(fitted.json?.error)).toBe(200);
    console.log(`[curves] 130k points: upload ${(t1 - t0).toFixed(0)} ms, read+plot ${(t2 - t1).toFixed(0)} ms, fit ${(performance.now() - t2).toFixed(0)} ms`);
    const p = fitted.json.fit.parameters;
    expect(p.mu).toBeGreaterThan(90);
    expect(p.mu).toBeLessThan(110);
    expect(fitted.json.fit.rmsErrorPercent).toBeLessThan(5);
  }, 120_000);
});
