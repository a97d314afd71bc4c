// The chain's supply solution and signal levels. Hand-worked numbers are written out beside each check.
import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { heaterShare, solveChain, solveLadder, stageSupplyCurrent, type ChainStage } from '@/lib/calc/chain';
import { stageInputSchema } from '@/lib/validation/stage';

// Koren's published 12AX7 and 300B triode sets (tube-models.md §3.1, K96).
const KOREN_12AX7 = { model: 'koren-triode', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300, name: '12AX7' } as const;
const KOREN_300B = { model: 'koren-triode', mu: 3.95, ex: 1.4, kg1: 1550, kp: 65, kvb: 300, name: '300B' } as const;

const preamp = (supply: number) =>
  stageInputSchema.parse({ topology: 'common-cathode', tube: KOREN_12AX7, supply, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' } });
const output = (supply: number) =>
  stageInputSchema.parse({ topology: 'single-ended-output', tube: KOREN_300B, supply, gridResistor: '100k', primaryImpedance: '3k5', primaryResistance: 150, bias: { kind: 'cathode', cathodeResistor: '1k', cathodeBypass: '100u' } });

const SUPPLY = {
  rawVoltage: 300,
  sourceResistance: 100,
  nodes: [
    { key: 'B+1', name: 'Reservoir', droppingResistor: 0, filterCapacitor: 100e-6 },
    { key: 'B+2', name: 'Driver', droppingResistor: 4700, filterCapacitor: 47e-6 },
    { key: 'B+3', name: 'Input', droppingResistor: 22000, filterCapacitor: 22e-6 },
  ],
};

describe('supply ladder with fixed currents (worked by hand)', () => {
  it('gives the node voltages of the hand calculation', () => {
    // By hand: 50 mA at B+1, 4 mA at B+2, 2 mA at B+3 → 56 mA total.
    // Loaded raw = 300 − 100 Ω × 56 mA = 294.4 V; B+1 = 294.4 − 0 = 294.4 V;
    // B+2 = 294.4 − 4.7 kΩ × 6 mA = 266.2 V; B+3 = 266.2 − 22 kΩ × 2 mA = 222.2 V.
    const r = solveLadder(SUPPLY, [0.05, 0.004, 0.002]);
    expect(r.totalCurrent).toBeCloseTo(0.056, 12);
    expect(r.loadedVoltage).toBeCloseTo(294.4, 9);
    expect(r.voltages[0]).toBeCloseTo(294.4, 9);
    expect(r.voltages[1]).toBeCloseTo(266.2, 9);
    expect(r.voltages[2]).toBeCloseTo(222.2, 9);
    expect(r.throughCurrents).toEqual([0.056, 0.006, 0.002].map((x) => expect.closeTo(x, 12)));
  });
});

describe('chain with real stages iterated to agreement', () => {
  const stages: ChainStage[] = [
    { id: 1, name: 'V1a input', position: 1, supplyNode: 'B+3', input: preamp(250), heater: { voltage: 12.6, current: 0.15, sections: 2, designation: '12AX7' } },
    { id: 2, name: 'V1b gain', position: 2, supplyNode: 'B+2', input: preamp(250), heater: { voltage: 12.6, current: 0.15, sections: 2, designation: '12AX7' } },
    { id: 3, name: 'V2 output', position: 3, supplyNode: 'B+1', input: output(300), heater: { voltage: 5, current: 1.2, sections: 1, designation: '300B' } },
  ];
  const heaters = [
    { key: 'H1', name: '6.3 V winding', voltage: 6.3 },
    { key: 'H2', name: '5 V filament', voltage: 5 },
  ];
  const result = solveChain(stages, { ...SUPPLY, heaters }, { inputRms: 0.1 });

  it('converges within 0.01 V and every stage sits at its node voltage', () => {
    expect(result.supplyError).toBeNull();
    expect(result.supply?.converged).toBe(true);
    expect(result.supply!.residual).toBeLessThan(0.01);
    const byKey = Object.fromEntries(result.supply!.nodes.map((n) => [n.key, n]));
    for (const s of result.stages) expect(s.solvedSupply).toBeCloseTo(byKey[s.supplyNode!]!.voltage, 9);
    // assumed supplies are kept beside the solved ones
    expect(result.stages.map((s) => s.assumedSupply)).toEqual([250, 250, 300]);
  });

  it('satisfies Kirchhoff at each node with currents re-computed independently at the solved voltages', () => {
    const sup = result.supply!;
    // each stage analysed again at its solved node voltage, outside the solver
    const drawn = result.stages.map((s, i) => {
      const input = stages[i]!.input!;
      return stageSupplyCurrent(input, analyzeStage({ ...input, supply: s.solvedSupply! }));
    });
    const [b1, b2, b3] = sup.nodes;
    const i1 = drawn[2]!, i2 = drawn[1]!, i3 = drawn[0]!;
    // KCL: current in = own stages + current out; KVL across each resistor: ΔV = R × I_in. Tolerance: 0.01 V on volts.
    expect(b3!.currentIn).toBeCloseTo(i3, 5);
    expect(b2!.currentIn).toBeCloseTo(i2 + i3, 5);
    expect(b1!.currentIn).toBeCloseTo(i1 + i2 + i3, 5);
    for (const n of sup.nodes) expect(n.currentIn).toBeCloseTo(n.stageCurrent + n.currentOut, 12);
    expect(Math.abs(300 - 100 * (i1 + i2 + i3) - 0 - b1!.voltage)).toBeLessThan(0.02);
    expect(Math.abs(b1!.voltage - 4700 * (i2 + i3) - b2!.voltage)).toBeLessThan(0.02);
    expect(Math.abs(b2!.voltage - 22000 * i3 - b3!.voltage)).toBeLessThan(0.02);
    // order of magnitude from common practice: a 12AX7 with 100 kΩ plate load idles near 1 mA, a 300B near 60 mA
    expect(i3).toBeGreaterThan(0.4e-3);
    expect(i3).toBeLessThan(1.5e-3);
    expect(i1).toBeGreaterThan(0.03);
    expect(i1).toBeLessThan(0.1);
    // the nodes step down: the reservoir is highest
    expect(b1!.voltage).toBeGreaterThan(b2!.voltage);
    expect(b2!.voltage).toBeGreaterThan(b3!.voltage);
  });

  it('takes levels from the chain solved end to end, not from a product of gains', () => {
    const [a, b, c] = result.stages;
    const e2e = result.endToEnd!;
    expect(e2e).not.toBeNull();
    // the first grid sees the source (no source resistance)
    expect(a!.inputRms).toBeCloseTo(0.1, 9);
    // each grid sees the previous stage's solved output through its coupling capacitor (1 kHz: no visible drop)
    expect(Math.abs(b!.inputRms! / a!.outputRms! - 1)).toBeLessThan(0.005);
    expect(Math.abs(c!.inputRms! / b!.outputRms! - 1)).toBeLessThan(0.005);
    expect(result.outputRms).toBeCloseTo(e2e.output.amplitude / Math.SQRT2, 12);
    // with two bypassed 12AX7 stages (~×60 each, common practice) the chain clips well below 100 mV: the output
    // is the clipped level, far under the small-signal projection input × gain
    expect(result.firstClip?.stageId).not.toBe(1);
    expect(result.firstClip!.chainInputRms).toBeLessThan(0.1);
    expect(result.outputRms!).toBeLessThan(0.5 * 0.1 * result.totalGain!);
    const clipped = result.stages.find((s) => s.clipping)!;
    expect(clipped.limitedBy).not.toBe('none');
    expect(result.warnings.some((w) => w.includes('clips at this input level'))).toBe(true);
    // the sweep marks the clip point between its neighbours
    const pts = e2e.sweep!.points;
    expect(pts.length).toBeGreaterThanOrEqual(40);
    const k = pts.findIndex((p) => p.clipped);
    expect(k).toBeGreaterThan(0);
    expect(e2e.sweep!.clip!.inputAmplitude).toBeGreaterThan(pts[k - 1]!.inputAmplitude * 0.999);
    expect(e2e.sweep!.clip!.inputAmplitude).toBeLessThanOrEqual(pts[k]!.inputAmplitude * 1.001);
  });

  it('totals heater current per supply, each stage counting its section share', () => {
    // 12AX7 12.6 V 0.15 A centre-tapped, parallel on 6.3 V → 0.3 A per envelope, 0.15 A per section; two sections = 0.3 A.
    const h63 = result.heaters.find((h) => h.key === 'H1')!;
    expect(h63.current).toBeCloseTo(0.3, 12);
    expect(h63.loads).toHaveLength(2);
    // 300B filament 5 V 1.2 A (tube-models.md §4.1 [M]) on the 5 V supply.
    const h5 = result.heaters.find((h) => h.key === 'H2')!;
    expect(h5.current).toBeCloseTo(1.2, 12);
    expect(h5.power).toBeCloseTo(6, 12);
    expect(result.unassignedHeaters).toEqual([]);
    expect(heaterShare({ voltage: 6.3, current: 1.5, sections: 1 }, 'push-pull-output', 6.3)).toBeCloseTo(3, 12);
    expect(heaterShare({ voltage: 6.3, current: 1.5, sections: 1 }, 'common-cathode', 12.6)).toBeNull();
  });

  it('without a raw B+ the stages keep their assumed supplies', () => {
    const r = solveChain(stages, { nodes: [] }, { inputRms: 0.05 });
    expect(r.supply).toBeNull();
    expect(r.stages.every((s) => s.solvedSupply === null)).toBe(true);
    expect(r.stages[0]!.inputRms).toBeCloseTo(0.05, 9);
  });

  it('leaves a stage that cannot be analysed out of the supply solution and says so', () => {
    const broken: ChainStage = { id: 9, name: 'Broken', position: 4, supplyNode: 'B+2', input: null, inputError: { code: 'invalid-input', message: 'no model' }, topology: 'common-cathode', assumedSupply: 250 };
    const r = solveChain([...stages, broken], SUPPLY, { inputRms: 0.01 });
    expect(r.supply?.converged).toBe(true);
    expect(r.stages.at(-1)).toMatchObject({ stageId: 9, error: { message: 'no model' }, solvedSupply: null, supplyCurrent: null });
    expect(r.supply!.nodes[1]!.stageIds).toEqual([2]);
    expect(r.warnings.some((w) => w.includes('Broken'))).toBe(true);
    // the chain beyond a broken stage has no level
    expect(r.totalGain).toBeNull();
  });

  it('reports a supply that cannot deliver the current instead of a number', () => {
    const starving = { ...SUPPLY, nodes: SUPPLY.nodes.map((n, i) => (i === 0 ? { ...n, droppingResistor: 20000 } : n)) };
    const r = solveChain(stages, starving, { inputRms: 0.1 });
    expect(r.supplyError).not.toBeNull();
    expect(r.supply === null || r.supply.converged === false || r.supply.nodes[0]!.voltage > 0).toBe(true);
  });
});
