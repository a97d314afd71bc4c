import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { threeHalvesTriodeCurrent, threeHalvesTriodeCurrentD } from '@/lib/calc/models/child-langmuir';
import { gridCurrent, gridCurrentD } from '@/lib/calc/models/grid-current';
import {
  korenPentodePlateCurrent,
  korenPentodePlateCurrentD,
  korenPentodeScreenCurrent,
  korenPentodeScreenCurrentD,
  korenTriodeCurrent,
  korenTriodeCurrentD,
  logistic,
  softplus,
} from '@/lib/calc/models/koren';
import { tubeModel } from '@/lib/calc/models/registry';
import { solveNetwork, solveNetworkBracketed, type SingleTubeNetwork } from '@/lib/calc/stages/network';
import { solveDenseInPlace } from '@/lib/calc/stages/newton';

// The Newton solvers rest on the analytic derivatives and must land on the same roots as the bracketing
// solvers they replace (which stay as the fallback).
const AX7 = { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 };
const DJ8 = { mu: 28, ex: 1.3, kg1: 330, kp: 320, kvb: 300 };
const EL34 = { mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 };

const rel = (a: number, b: number, floor: number) => Math.abs(a - b) / Math.max(Math.abs(b), floor);
const central = (f: (x: number) => number, x: number, h: number) => (f(x + h) - f(x - h)) / (2 * h);

describe('analytic model derivatives', () => {
  const out = new Float64Array(4);

  it('logistic is the derivative of softplus and saturates cleanly', () => {
    for (const x of [-50, -5, -0.3, 0, 0.7, 4, 40]) expect(rel(logistic(x), central(softplus, x, 1e-5), 1e-12)).toBeLessThan(1e-6);
    expect(logistic(-800)).toBe(0);
    expect(logistic(800)).toBe(1);
  });

  it('Koren triode: same current as the plain function, derivatives match central differences', () => {
    fc.assert(
      fc.property(fc.double({ min: 5, max: 500, noNaN: true }), fc.double({ min: -6, max: 1, noNaN: true }), (va, vg) => {
        const ia = korenTriodeCurrentD(AX7, va, vg, out);
        expect(ia).toBe(korenTriodeCurrent(AX7, va, vg));
        if (ia < 1e-9) return;
        expect(rel(out[1] as number, central((v) => korenTriodeCurrent(AX7, v, vg), va, 1e-3), 1e-9)).toBeLessThan(1e-5);
        expect(rel(out[2] as number, central((v) => korenTriodeCurrent(AX7, va, v), vg, 1e-5), 1e-9)).toBeLessThan(1e-5);
      }),
    );
  });

  it('Koren pentode plate and screen: same currents, derivatives match central differences', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 5, max: 600, noNaN: true }),
        fc.double({ min: -40, max: 0, noNaN: true }),
        fc.double({ min: 100, max: 400, noNaN: true }),
        (va, vg1, vg2) => {
          const ia = korenPentodePlateCurrentD(EL34, va, vg1, vg2, out);
          expect(ia).toBe(korenPentodePlateCurrent(EL34, va, vg1, vg2));
          if (ia > 1e-7) {
            expect(rel(out[1] as number, central((v) => korenPentodePlateCurrent(EL34, v, vg1, vg2), va, 1e-3), 1e-9)).toBeLessThan(1e-5);
            expect(rel(out[2] as number, central((v) => korenPentodePlateCurrent(EL34, va, v, vg2), vg1, 1e-4), 1e-9)).toBeLessThan(1e-5);
            expect(rel(out[3] as number, central((v) => korenPentodePlateCurrent(EL34, va, vg1, v), vg2, 1e-3), 1e-9)).toBeLessThan(1e-5);
          }
          const ig2 = korenPentodeScreenCurrentD(EL34, vg1, vg2, out);
          expect(ig2).toBe(korenPentodeScreenCurrent(EL34, vg1, vg2));
          if (ig2 > 1e-7) {
            expect(rel(out[1] as number, central((v) => korenPentodeScreenCurrent(EL34, v, vg2), vg1, 1e-4), 1e-9)).toBeLessThan(1e-5);
            expect(rel(out[2] as number, central((v) => korenPentodeScreenCurrent(EL34, vg1, v), vg2, 1e-3), 1e-9)).toBeLessThan(1e-5);
          }
        },
      ),
    );
  });

  it('grid diode and 3/2-power triode: same currents, derivatives match central differences', () => {
    for (const v of [0.05, 0.3, 1, 5, 30]) {
      expect(gridCurrentD(v, 2000, out)).toBe(gridCurrent(v, 2000));
      expect(rel(out[1] as number, central((x) => gridCurrent(x, 2000), v, 1e-5), 1e-12)).toBeLessThan(1e-4);
    }
    expect(gridCurrentD(-1, 2000, out)).toBe(0);
    expect(out[1]).toBe(0);
    const p = { perveance: 2e-5, mu: 20 };
    const ia = threeHalvesTriodeCurrentD(p, 200, -3, out);
    expect(ia).toBe(threeHalvesTriodeCurrent(p, 200, -3));
    expect(rel(out[1] as number, central((x) => threeHalvesTriodeCurrent(p, x, -3), 200, 1e-3), 1e-12)).toBeLessThan(1e-6);
    expect(rel(out[2] as number, central((x) => threeHalvesTriodeCurrent(p, 200, x), -3, 1e-5), 1e-12)).toBeLessThan(1e-6);
  });
});

describe('dense elimination', () => {
  it('solves a pivoting case and refuses a singular one', () => {
    // [[0 2 1] [1 1 0] [3 0 1]]·(1, 2, 1) = (5, 3, 4); the zero leading pivot forces a row swap
    const a = new Float64Array([0, 2, 1, 1, 1, 0, 3, 0, 1]);
    const b = new Float64Array([5, 3, 4]);
    expect(solveDenseInPlace(3, a, b)).toBe(true);
    expect(b[0]).toBeCloseTo(1, 12);
    expect(b[1]).toBeCloseTo(2, 12);
    expect(b[2]).toBeCloseTo(1, 12);
    expect(solveDenseInPlace(2, new Float64Array([1, 2, 2, 4]), new Float64Array([1, 2]))).toBe(false);
  });
});

describe('whole-network Newton against nested bracketing', () => {
  const triodeNet = (model: ReturnType<typeof tubeModel>, rk: number, rkAc: number, gpc = 0): SingleTubeNetwork => ({
    model,
    supply: 300,
    plateDc: 100e3,
    plateAc: 50e3,
    cathodeDc: rk,
    cathodeAc: rkAc,
    gridOffset: 0,
    gridPerCathodeCurrent: gpc,
    screen: null,
    output: 'plate',
  });

  it('common cathode and self-biased follower: the same state from poor starting guesses', () => {
    const ax7 = tubeModel({ model: 'koren-triode', ...AX7 });
    const dj8 = tubeModel({ model: 'koren-triode', ...DJ8 });
    const nets = [triodeNet(ax7, 1500, 1500), triodeNet(ax7, 1500, 0), { ...triodeNet(dj8, 20e3, 20e3, 19.5e3), plateDc: 1e3, plateAc: 1e3, supply: 200, output: 'cathode' as const }];
    for (const net of nets) {
      const op = solveNetworkBracketed(net, 0, null);
      const m = { ia: op.ia, ig2: op.ig2, ik: op.ik };
      fc.assert(
        fc.property(fc.double({ min: -3, max: 3, noNaN: true }), fc.double({ min: 0.2, max: 3, noNaN: true }), (vin, wrong) => {
          const guess = { ...op, ia: op.ia * wrong, ik: op.ik * wrong };
          const a = solveNetwork(net, vin, m, 0, guess);
          const b = solveNetworkBracketed(net, vin, m);
          for (const k of ['ia', 'ik', 'vp', 'vk', 'vg'] as const) {
            expect(Number.isFinite(a[k])).toBe(true);
            expect(Math.abs(a[k] - b[k])).toBeLessThanOrEqual(1e-9 * Math.max(Math.abs(b[k]), k === 'ia' || k === 'ik' ? 1e-6 : 1));
          }
        }),
        { numRuns: 60 },
      );
    }
  });

  it('pentode with a screen resistor: the same state', () => {
    const el34 = tubeModel({ model: 'koren-pentode', ...EL34 });
    const net: SingleTubeNetwork = {
      model: el34,
      supply: 350,
      plateDc: 10e3,
      plateAc: 10e3,
      cathodeDc: 470,
      cathodeAc: 0,
      gridOffset: 0,
      gridPerCathodeCurrent: 0,
      screen: { supply: 350, dc: 22e3, ac: 22e3 },
      output: 'plate',
    };
    const op = solveNetworkBracketed(net, 0, null);
    const m = { ia: op.ia, ig2: op.ig2, ik: op.ik };
    for (const vin of [-20, -5, -1, 0, 1, 5, 10]) {
      const a = solveNetwork(net, vin, m, 0, op);
      const b = solveNetworkBracketed(net, vin, m);
      expect(rel(a.ia, b.ia, 1e-6)).toBeLessThan(1e-9);
      expect(rel(a.ig2, b.ig2, 1e-7)).toBeLessThan(1e-9);
      expect(rel(a.vg2, b.vg2, 1)).toBeLessThan(1e-9);
    }
  });
});
