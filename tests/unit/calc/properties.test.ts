import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeStage, CalcError } from '@/lib/calc';
import type { CalcErrorCode } from '@/lib/calc/errors';
import { korenPentodePlateCurrent, korenTriodeCurrent } from '@/lib/calc/models/koren';
import { stageInputSchema, type StageInput } from '@/lib/validation/stage';

// Property checks (common practice): over random valid inputs the engine must solve a stated share and may
// refuse the rest only with the error kinds that input can honestly produce; the model is monotone, and the
// solved point satisfies both the circuit and the tube equation.

/** Share of random valid inputs the engine must solve (the rest may be refused with an allowed CalcError). */
const MIN_SOLVED_SHARE = 0.9;

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

/** A random valid input and the engine error kinds it may legitimately produce. */
interface Case {
  input: StageInput;
  allowed: CalcErrorCode[];
}
type Engine = (input: StageInput) => unknown;

/**
 * Runs the engine over the cases and returns every way it fell short: a solved share under the floor, an answer
 * that is not finite or does not survive JSON, an error that is not a CalcError, or a CalcError of a kind the
 * input cannot produce. An empty list is a pass.
 */
function engineShortfalls(engine: Engine, cases: Case[]): string[] {
  const problems: string[] = [];
  let solved = 0;
  for (const [i, c] of cases.entries()) {
    let result: unknown;
    try {
      result = engine(c.input);
    } catch (err) {
      if (!(err instanceof CalcError)) problems.push(`case ${i}: threw ${String(err)} (not a CalcError)`);
      else if (!c.allowed.includes(err.code)) problems.push(`case ${i}: CalcError '${err.code}' is not expected for this input (allowed: ${c.allowed.join(', ')})`);
      continue;
    }
    if (!result || typeof result !== 'object' || !allFinite(result)) {
      problems.push(`case ${i}: answer is missing or not finite`);
      continue;
    }
    const op = (result as { operatingPoint?: { plateCurrent?: unknown } }).operatingPoint;
    if (typeof op?.plateCurrent !== 'number' || JSON.parse(JSON.stringify(result)).operatingPoint.plateCurrent !== op.plateCurrent) {
      problems.push(`case ${i}: operating point missing or changed by JSON`);
      continue;
    }
    solved += 1;
  }
  const share = cases.length ? solved / cases.length : 0;
  if (share < MIN_SOLVED_SHARE) problems.push(`solved ${solved} of ${cases.length} (${(100 * share).toFixed(1)} %), below ${100 * MIN_SOLVED_SHARE} %`);
  return problems;
}

// Kinds any stage may meet: the tube cut off at idle, or a point the solver cannot reach. A negative fixed bias
// or a cathode-biased grid cannot conduct at idle; schema-valid inputs with a topology that fits the tube are
// never 'invalid-input' or 'unsupported'.
const ALWAYS: CalcErrorCode[] = ['cutoff', 'no-solution'];

const commonCathodeCase = fc
  .tuple(
    triodeParams,
    fc.double({ min: 20, max: 600, noNaN: true }),
    fc.double({ min: 1e3, max: 1e6, noNaN: true }),
    fc.option(fc.double({ min: 50, max: 20e3, noNaN: true }), { nil: null }),
    fc.boolean(),
    fc.double({ min: 0, max: 20, noNaN: true }),
  )
  .map(([tube, supply, ra, rk, bypass, amplitude]): Case => ({
    input: stageInputSchema.parse({
      topology: 'common-cathode',
      tube: { model: 'koren-triode', ...tube },
      supply,
      gridResistor: 1e6,
      plateResistor: ra,
      bias: rk === null ? { kind: 'fixed', fixedBias: -supply / (2 * tube.mu) } : { kind: 'cathode', cathodeResistor: rk, cathodeBypass: bypass ? 47e-6 : null },
      load: { resistance: 470e3, couplingCapacitor: 47e-9 },
      drive: { amplitude },
    }),
    allowed: ALWAYS,
  }));

const pentode = { model: 'koren-pentode', mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 };
const otherTopologyCase = fc
  .tuple(fc.double({ min: 100, max: 500, noNaN: true }), fc.double({ min: 0, max: 40, noNaN: true }), fc.integer({ min: 0, max: 3 }))
  .map(([supply, amplitude, which]): Case => {
    const inputs = [
      { topology: 'cathode-follower', tube: { model: 'koren-triode', mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300 }, supply, gridResistor: 1e6, bias: { kind: 'self', biasResistor: 1000 }, cathodeResistor: 20e3, drive: { amplitude } },
      { topology: 'pentode-amplifier', tube: pentode, supply, gridResistor: 1e5, plateResistor: 5e3, bias: { kind: 'cathode', cathodeResistor: 470, cathodeBypass: null }, screen: { kind: 'resistor', resistor: 2e3, bypass: null }, drive: { amplitude } },
      { topology: 'single-ended-output', tube: pentode, supply, gridResistor: 1e5, primaryImpedance: 3e3, primaryResistance: 100, bias: { kind: 'cathode', cathodeResistor: 200, cathodeBypass: 1e-4 }, screen: { kind: 'fixed' }, drive: { amplitude } },
      { topology: 'push-pull-output', tube: pentode, class: 'AB', supply, gridResistor: 1e5, plateToPlateImpedance: 6e3, primaryResistance: 150, bias: { kind: 'cathode', cathodeResistor: 150, cathodeBypass: null }, screen: { kind: 'resistor', resistor: 500, bypass: null }, drive: { amplitude } },
    ];
    return { input: stageInputSchema.parse(inputs[which]), allowed: ALWAYS };
  });

// Fixed seeds keep a failure reproducible; FC_SEED overrides them to explore other samples.
const seed = (fallback: number) => (process.env.FC_SEED ? Number(process.env.FC_SEED) : fallback);
const commonCathodeCases = fc.sample(commonCathodeCase, { numRuns: 150, seed: seed(20261202) });
const otherCases = fc.sample(otherTopologyCase, { numRuns: 60, seed: seed(7) });

describe('engine over random valid inputs', () => {
  it(`common-cathode: solves ≥ ${100 * MIN_SOLVED_SHARE} % and refuses the rest only with an allowed CalcError`, () => {
    expect(engineShortfalls(analyzeStage, commonCathodeCases)).toEqual([]);
  });

  it(`every other topology: solves ≥ ${100 * MIN_SOLVED_SHARE} % and refuses the rest only with an allowed CalcError`, () => {
    expect(engineShortfalls(analyzeStage, otherCases)).toEqual([]);
  });

  it('the check itself fails an engine that refuses everything, answers NaN, or throws the wrong kind', () => {
    const refuses: Engine = () => {
      throw new CalcError('no-solution', 'refused');
    };
    expect(engineShortfalls(refuses, commonCathodeCases).at(-1)).toMatch(/^solved 0 of 150/);
    const nan: Engine = (input) => {
      const r = analyzeStage(input) as { operatingPoint: { plateCurrent: number } };
      return { ...r, operatingPoint: { ...r.operatingPoint, plateCurrent: Number.NaN } };
    };
    expect(engineShortfalls(nan, otherCases.slice(0, 4)).some((p) => p.includes('not finite'))).toBe(true);
    const wrongKind: Engine = () => {
      throw new CalcError('unsupported', 'refused');
    };
    expect(engineShortfalls(wrongKind, otherCases.slice(0, 4)).some((p) => p.includes("'unsupported' is not expected"))).toBe(true);
    const plainError: Engine = () => {
      throw new TypeError('x is undefined');
    };
    expect(engineShortfalls(plainError, otherCases.slice(0, 4)).some((p) => p.includes('not a CalcError'))).toBe(true);
  });
});

describe('engine properties', () => {
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
