// The phase splitters over random valid inputs: the engine answers with finite numbers or refuses with a CalcError
// of a kind the input can produce, and solves most of them. Consistency checks that hold for any solution:
// the tail current is the sum of the sections' cathode currents, both outputs move in antiphase, and the DC plate
// voltage is the supply less the plate resistor's drop.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeStage, CalcError, type CalcErrorCode, type StageAnalysis } from '@/lib/calc';
import { stageInputSchema, type StageInput } from '@/lib/validation/stage';

// Koren's published sets (tube-models.md §3.1)
const TRIODES = [
  { model: 'koren-triode', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 },
  { model: 'koren-triode', mu: 60, ex: 1.35, kg1: 460, kp: 300, kvb: 300 },
  { model: 'koren-triode', mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300 },
] as const;

type Case = { input: StageInput; allowed: CalcErrorCode[] };

const ltpCase = fc
  .record({
    tube: fc.constantFrom(...TRIODES),
    supply: fc.double({ min: 150, max: 450, noNaN: true }),
    ra1: fc.double({ min: 20e3, max: 220e3, noNaN: true }),
    trim: fc.double({ min: 0.9, max: 1.1, noNaN: true }),
    tail: fc.oneof(
      fc.record({ kind: fc.constant('resistor' as const), biasResistor: fc.double({ min: 300, max: 3e3, noNaN: true }), tailResistor: fc.double({ min: 5e3, max: 100e3, noNaN: true }), tailSupply: fc.constantFrom(0, -100, -200) }),
      fc.record({ kind: fc.constant('current-source' as const), current: fc.double({ min: 0.5e-3, max: 6e-3, noNaN: true }) }),
    ),
    tap: fc.boolean(),
    gridVoltage: fc.double({ min: 0, max: 100, noNaN: true }),
    load: fc.boolean(),
    amplitude: fc.double({ min: 0, max: 10, noNaN: true }),
  })
  .map((r): Case => {
    const tap = r.tap && r.tail.kind === 'resistor';
    return {
      input: stageInputSchema.parse({
        topology: 'long-tailed-pair',
        tube: r.tube,
        supply: r.supply,
        gridResistor: 1e6,
        plateResistors: { inverting: r.ra1, nonInverting: r.ra1 * r.trim },
        tail: r.tail,
        grids: tap ? { kind: 'bias-tap' } : { kind: 'dc', gridVoltage: Math.min(r.gridVoltage, 0.5 * r.supply) },
        secondGridBypass: 1e-7,
        ...(r.load ? { load: { resistance: 220e3, couplingCapacitor: 1e-7 } } : {}),
        drive: { amplitude: r.amplitude },
      }),
      // a DC-coupled grid above a resistor tail's cathode, or a tail current the plates cannot pass, is refused
      allowed: ['cutoff', 'no-solution', 'grid-conduction'],
    };
  });

const slCase = fc
  .record({
    tube: fc.constantFrom(...TRIODES),
    supply: fc.double({ min: 150, max: 450, noNaN: true }),
    r: fc.double({ min: 10e3, max: 100e3, noNaN: true }),
    rb: fc.double({ min: 0, max: 3e3, noNaN: true }),
    boot: fc.boolean(),
    gridFraction: fc.double({ min: 0.15, max: 0.4, noNaN: true }),
    load: fc.boolean(),
    amplitude: fc.double({ min: 0, max: 40, noNaN: true }),
  })
  .map(
    (r): Case => ({
      input: stageInputSchema.parse({
        topology: 'split-load',
        tube: r.tube,
        supply: r.supply,
        gridResistor: 1e6,
        plateResistor: r.r,
        cathodeResistor: r.r,
        biasResistor: r.boot ? Math.max(r.rb, 300) : r.rb,
        bias: r.boot ? { kind: 'bootstrapped' } : { kind: 'dc-coupled', gridVoltage: r.gridFraction * r.supply },
        ...(r.load ? { load: { resistance: 470e3, couplingCapacitor: 1e-7 } } : {}),
        drive: { amplitude: r.amplitude },
      }),
      allowed: ['cutoff', 'no-solution', 'grid-conduction'],
    }),
  );

function check(cases: Case[], consistent: (a: StageAnalysis, input: StageInput) => void) {
  let solved = 0;
  for (const c of cases) {
    let a: StageAnalysis;
    try {
      a = analyzeStage(c.input);
    } catch (err) {
      expect(err, String(err)).toBeInstanceOf(CalcError);
      expect(c.allowed).toContain((err as CalcError).code);
      continue;
    }
    // the engine never answers NaN (JSON would turn it into null inside a number list)
    expect(/\[[^\]]*null/.test(JSON.stringify(a.outputs)), JSON.stringify(c.input)).toBe(false);
    consistent(a, c.input);
    solved++;
  }
  return solved / cases.length;
}

const seed = (fallback: number) => (process.env.FC_SEED ? Number(process.env.FC_SEED) : fallback);

describe('phase splitters over random valid inputs', () => {
  it('long-tailed pair: ≥ 90 % solved, consistent currents and antiphase outputs', () => {
    const share = check(fc.sample(ltpCase, { numRuns: 40, seed: seed(12) }), (a, input) => {
      if (input.topology !== 'long-tailed-pair') return;
      const sum = a.perTube.reduce((s, op) => s + op.cathodeCurrent, 0);
      expect(Math.abs(a.tailCurrent! - sum)).toBeLessThan(1e-9 + 1e-9 * sum);
      if (input.tail.kind === 'current-source') expect(Math.abs(a.tailCurrent! - input.tail.current)).toBeLessThan(1e-9 * input.tail.current + 1e-12);
      expect(a.outputs!.inverting!.gain).toBeLessThan(0);
      expect(a.outputs!['non-inverting']!.gain).toBeGreaterThan(0);
      const p1 = a.perTube[0]!;
      expect(Math.abs(p1.plateVoltage - (input.supply - p1.plateCurrent * input.plateResistors.inverting))).toBeLessThan(1e-6 * input.supply);
    });
    expect(share).toBeGreaterThanOrEqual(0.9);
  });

  it('split-load: ≥ 90 % solved, gains below 1 in antiphase, plate current equals cathode current', () => {
    const share = check(fc.sample(slCase, { numRuns: 40, seed: seed(34) }), (a, input) => {
      if (input.topology !== 'split-load') return;
      expect(a.outputs!.plate!.gain).toBeLessThan(0);
      expect(a.outputs!.cathode!.gain).toBeGreaterThan(0);
      expect(a.outputs!.cathode!.gain).toBeLessThan(1);
      const op = a.operatingPoint;
      expect(Math.abs(op.cathodeVoltage - op.cathodeCurrent * (input.cathodeResistor + input.biasResistor))).toBeLessThan(1e-6 * input.supply);
    });
    expect(share).toBeGreaterThanOrEqual(0.9);
  });
});
