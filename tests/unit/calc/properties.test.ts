import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeStage, CalcError } from '@/lib/calc';
import { korenPentodePlateCurrent, korenTriodeCurrent } from '@/lib/calc/models/koren';
import { stageInputSchema } from '@/lib/validation/stage';

// Property checks (common practice): the engine returns finite numbers or a typed CalcError, the model is
// monotone, and the solved point satisfies both the circuit and the tube equation.
const triodeParams = fc.record({
  mu: fc.double({ min: 3, max: 120, noNaN: true }),
  ex: fc.double({ min: 1.2, max: 1.6, noNaN: true }),
  kg1: fc.double({ min: 200, max: 3000, noNaN: true }),
  kp: fc.double({ min: 30, max: 700, noNaN: true }),
  kvb: fc.double({ min: 0, max: 2000, noNaN: true }),
});

function allFinite(x: unknown): boolean {
  if (typeof x === 'number') return Number.isFinite(x);
  if (Array.isArray(x)) return x.every(allFinite);
  if (x && typeof x === 'object') return Object.values(x).every(allFinite);
  return true;
}

describe('engine properties', () => {
  it('common-cathode: finite results or a CalcError over wide valid inputs', () => {
    fc.assert(
      fc.property(
        triodeParams,
        fc.double({ min: 20, max: 600, noNaN: true }),
        fc.double({ min: 1e3, max: 1e6, noNaN: true }),
        fc.option(fc.double({ min: 50, max: 20e3, noNaN: true }), { nil: null }),
        fc.boolean(),
        fc.double({ min: 0, max: 20, noNaN: true }),
        (tube, supply, ra, rk, bypass, amplitude) => {
          const input = stageInputSchema.parse({
            topology: 'common-cathode',
            tube: { model: 'koren-triode', ...tube },
            supply,
            gridResistor: 1e6,
            plateResistor: ra,
            bias: rk === null ? { kind: 'fixed', fixedBias: -supply / (2 * tube.mu) } : { kind: 'cathode', cathodeResistor: rk, cathodeBypass: bypass ? 47e-6 : null },
            load: { resistance: 470e3, couplingCapacitor: 47e-9 },
            drive: { amplitude },
          });
          try {
            const r = analyzeStage(input);
            expect(allFinite(r)).toBe(true);
            expect(JSON.parse(JSON.stringify(r)).operatingPoint.plateCurrent).toBe(r.operatingPoint.plateCurrent);
          } catch (err) {
            expect(err).toBeInstanceOf(CalcError);
          }
        },
      ),
      { numRuns: 60 },
    );
  });

  it('every topology: finite results or a CalcError', () => {
    const pentode = { model: 'koren-pentode', mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 };
    fc.assert(
      fc.property(fc.double({ min: 100, max: 500, noNaN: true }), fc.double({ min: 0, max: 40, noNaN: true }), fc.integer({ min: 0, max: 3 }), (supply, amplitude, which) => {
        const inputs = [
          { topology: 'cathode-follower', tube: { model: 'koren-triode', mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300 }, supply, gridResistor: 1e6, bias: { kind: 'self', biasResistor: 1000 }, cathodeResistor: 20e3, drive: { amplitude } },
          { topology: 'pentode-amplifier', tube: pentode, supply, gridResistor: 1e5, plateResistor: 5e3, bias: { kind: 'cathode', cathodeResistor: 470, cathodeBypass: null }, screen: { kind: 'resistor', resistor: 2e3, bypass: null }, drive: { amplitude } },
          { topology: 'single-ended-output', tube: pentode, supply, gridResistor: 1e5, primaryImpedance: 3e3, primaryResistance: 100, bias: { kind: 'cathode', cathodeResistor: 200, cathodeBypass: 1e-4 }, screen: { kind: 'fixed' }, drive: { amplitude } },
          { topology: 'push-pull-output', tube: pentode, class: 'AB', supply, gridResistor: 1e5, plateToPlateImpedance: 6e3, primaryResistance: 150, bias: { kind: 'cathode', cathodeResistor: 150, cathodeBypass: null }, screen: { kind: 'resistor', resistor: 500, bypass: null }, drive: { amplitude } },
        ];
        const input = stageInputSchema.parse(inputs[which]);
        try {
          expect(allFinite(analyzeStage(input))).toBe(true);
        } catch (err) {
          expect(err).toBeInstanceOf(CalcError);
        }
      }),
      { numRuns: 24 },
    );
  });

  it('Koren triode current rises with plate and grid voltage', () => {
    fc.assert(
      fc.property(triodeParams, fc.double({ min: 1, max: 600, noNaN: true }), fc.double({ min: -50, max: 5, noNaN: true }), fc.double({ min: 0.1, max: 50, noNaN: true }), (p, va, vg, d) => {
        expect(korenTriodeCurrent(p, va + d, vg)).toBeGreaterThanOrEqual(korenTriodeCurrent(p, va, vg));
        expect(korenTriodeCurrent(p, va, vg + d / 10)).toBeGreaterThanOrEqual(korenTriodeCurrent(p, va, vg));
      }),
    );
  });

  it('Koren pentode plate current rises with plate and grid voltage', () => {
    const p = { mu: 8.7, ex: 1.35, kg1: 1460, kg2: 4500, kp: 48, kvb: 12 };
    fc.assert(
      fc.property(fc.double({ min: 1, max: 600, noNaN: true }), fc.double({ min: -60, max: 0, noNaN: true }), fc.double({ min: 0.1, max: 50, noNaN: true }), (va, vg, d) => {
        expect(korenPentodePlateCurrent(p, va + d, vg, 250)).toBeGreaterThanOrEqual(korenPentodePlateCurrent(p, va, vg, 250));
        expect(korenPentodePlateCurrent(p, va, vg + d / 10, 250)).toBeGreaterThanOrEqual(korenPentodePlateCurrent(p, va, vg, 250));
      }),
    );
  });

  it('the operating point lies on the DC load line and on the tube curve; dissipation = Va·Ia', () => {
    fc.assert(
      fc.property(triodeParams, fc.double({ min: 100, max: 500, noNaN: true }), fc.double({ min: 10e3, max: 300e3, noNaN: true }), fc.double({ min: 200, max: 5e3, noNaN: true }), (tube, supply, ra, rk) => {
        const input = stageInputSchema.parse({
          topology: 'common-cathode',
          tube: { model: 'koren-triode', ...tube },
          supply,
          gridResistor: 1e6,
          plateResistor: ra,
          bias: { kind: 'cathode', cathodeResistor: rk, cathodeBypass: null },
        });
        let r;
        try {
          r = analyzeStage(input);
        } catch (err) {
          expect(err).toBeInstanceOf(CalcError);
          return;
        }
        const op = r.operatingPoint;
        const scale = Math.max(op.plateCurrent, 1e-9);
        expect(Math.abs(supply - op.plateCurrent * (ra + rk) - op.plateCathodeVoltage)).toBeLessThan(1e-6 * supply);
        expect(Math.abs(korenTriodeCurrent(tube, op.plateCathodeVoltage, op.gridCathodeVoltage) - op.plateCurrent) / scale).toBeLessThan(1e-6);
        expect(op.plateDissipation).toBeCloseTo(op.plateCathodeVoltage * op.plateCurrent, 12);
        const first = r.plot.dcLoadLine[0]!;
        expect(first.va).toBeCloseTo(supply, 6);
      }),
      { numRuns: 60 },
    );
  });
});
