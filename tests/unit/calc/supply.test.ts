// The supply solver on its own: structure checks, textbook limits and the ratings. The comparison with ngspice
// is in tests/spice/supply-ngspice.test.ts.
import { describe, expect, it } from 'vitest';
import { CalcError } from '@/lib/calc/errors';
import { solveSupply, type SupplyCircuit } from '@/lib/calc/supply';
import { supplyCircuitSchema } from '@/lib/validation/supply';

const base = (over: Partial<SupplyCircuit> = {}): SupplyCircuit => ({
  mains: { voltage: 230, frequency: 50, variation: 0.1 },
  secondary: { voltage: 300, resistance: 30 },
  rectifier: { kind: 'silicon-bridge' },
  reservoir: { capacitance: 47e-6, voltageRating: 500 },
  sections: [
    { kind: 'resistor', resistance: 1000 },
    { kind: 'capacitor', capacitance: 47e-6, voltageRating: 500 },
  ],
  loads: [{ node: 1, current: 0.05, fullDriveCurrent: 0.08 }],
  ...over,
});

describe('supply circuit schema', () => {
  it('accepts engineering notation and defaults the mains variation to ±10 % (common practice)', () => {
    const c = supplyCircuitSchema.parse({ ...base(), reservoir: { capacitance: '47u' }, sections: [{ kind: 'resistor', resistance: '4k7' }, { kind: 'capacitor', capacitance: '22u' }], mains: { voltage: 230, frequency: 50 } });
    expect(c.reservoir!.capacitance).toBeCloseTo(47e-6, 12);
    expect(c.sections[0]).toMatchObject({ kind: 'resistor', resistance: 4700 });
    expect(c.mains.variation).toBe(0.1);
  });
  it('names the field of a structural mistake', () => {
    const twoCaps = supplyCircuitSchema.safeParse({ ...base(), sections: [{ kind: 'capacitor', capacitance: 1e-5 }] });
    expect(twoCaps.success).toBe(false);
    expect(twoCaps.error!.issues[0]!.path).toEqual(['sections', 0]);
    const chokeFirst = supplyCircuitSchema.safeParse({ ...base(), reservoir: null, sections: [{ kind: 'resistor', resistance: 100 }, { kind: 'capacitor', capacitance: 1e-5 }], loads: [] });
    expect(chokeFirst.error!.issues.map((i) => i.message).join(' ')).toMatch(/start with a choke/);
    const badNode = supplyCircuitSchema.safeParse({ ...base(), loads: [{ node: 5, current: 0.01 }] });
    expect(badNode.error!.issues[0]!.path).toEqual(['loads', 0, 'node']);
    const noType = supplyCircuitSchema.safeParse({ ...base(), rectifier: { kind: 'vacuum' } });
    expect(noType.error!.issues[0]!.path).toEqual(['rectifier', 'type']);
  });
});

describe('supply solver', () => {
  it('refuses an unknown rectifier type with a CalcError', () => {
    expect(() => solveSupply(base({ rectifier: { kind: 'vacuum', type: 'XYZ' } }))).toThrow(CalcError);
  });

  it('at (almost) no load the reservoir sits at the secondary peak less two silicon drops (common practice)', () => {
    const r = solveSupply(base({ loads: [{ node: 1, resistance: 1e7 }] }));
    const peak = 300 * Math.SQRT2;
    // 1N4007 forward drop at a few mA is about 0.5–0.7 V per diode (from memory); two conduct in a bridge
    expect(r.nodes[0]!.dc).toBeGreaterThan(peak - 2.5);
    expect(r.nodes[0]!.dc).toBeLessThan(peak - 0.8);
  });

  it('full-wave reservoir ripple follows I/(2fC) (common practice) and halves when C doubles', () => {
    const one = solveSupply(base({ sections: [], loads: [{ node: 0, current: 0.1 }] }));
    const two = solveSupply(base({ reservoir: { capacitance: 94e-6 }, sections: [], loads: [{ node: 0, current: 0.1 }] }));
    const estimate = 0.1 / (2 * 50 * 47e-6);
    expect(one.nodes[0]!.ripplePeakToPeak / estimate).toBeGreaterThan(0.75);
    expect(one.nodes[0]!.ripplePeakToPeak / estimate).toBeLessThan(1.05);
    expect(two.nodes[0]!.ripplePeakToPeak / one.nodes[0]!.ripplePeakToPeak).toBeGreaterThan(0.45);
    expect(two.nodes[0]!.ripplePeakToPeak / one.nodes[0]!.ripplePeakToPeak).toBeLessThan(0.6);
    // the 2f component of a sawtooth-like ripple carries most of its rms
    expect(one.nodes[0]!.ripple2fRms).toBeLessThanOrEqual(one.nodes[0]!.rippleRms);
    expect(one.nodes[0]!.ripple2fRms / one.nodes[0]!.rippleRms).toBeGreaterThan(0.8);
  });

  it('sags under full drive and the later node loses I·R more than the reservoir (Ohm’s law on the DC currents)', () => {
    const r = solveSupply(base());
    expect(r.nodes[1]!.sag).toBeGreaterThan(0);
    const drop = r.nodes[0]!.dc - r.nodes[1]!.dc;
    expect(drop).toBeCloseTo(1000 * 0.05, 1);
    expect(r.nodes[0]!.fullDrive.dc - r.nodes[1]!.fullDrive.dc).toBeCloseTo(1000 * 0.08, 1);
  });

  it('ripple is at twice the mains frequency and smaller at 60 Hz than at 50 Hz', () => {
    const f50 = solveSupply(base());
    const f60 = solveSupply(base({ mains: { voltage: 120, frequency: 60 } }));
    expect(f50.rippleFrequency).toBe(100);
    expect(f60.rippleFrequency).toBe(120);
    expect(f60.nodes[0]!.ripplePeakToPeak).toBeLessThan(f50.nodes[0]!.ripplePeakToPeak);
  });

  it('peak inverse voltage: the peak for a bridge, twice the peak of each half for a centre tap, at high mains', () => {
    const bridge = solveSupply(base());
    const ct = solveSupply(base({ rectifier: { kind: 'silicon-centre-tap' } }));
    expect(bridge.rectifier.peakInverseVoltage).toBeCloseTo(300 * Math.SQRT2 * 1.1, 6);
    expect(ct.rectifier.peakInverseVoltage).toBeCloseTo(2 * 300 * Math.SQRT2 * 1.1, 6);
  });

  it('checks capacitor ratings against the turn-on peak at high mains, with a caution', () => {
    const r = solveSupply(base({ reservoir: { capacitance: 47e-6, voltageRating: 450 } }));
    const cap = r.ratings.find((x) => x.key === 'capacitor-voltage-0')!;
    // unloaded at +10 % mains the reservoir reaches about 1.1·300·√2 ≈ 467 V > 450 V
    expect(r.nodes[0]!.unloadedPeak!).toBeGreaterThan(455);
    expect(cap.status).toBe('over');
    expect(cap.caution).toMatch(/peak/);
    expect(r.unloadedPeak).toBeGreaterThanOrEqual(r.nodes[0]!.unloadedPeak!);
  });

  it('checks a vacuum rectifier like a tube: the largest reservoir its data allows, peak plate current, heater', () => {
    const r = solveSupply(base({ rectifier: { kind: 'vacuum', type: '5Y3GT' }, reservoir: { capacitance: 100e-6 }, sections: [], loads: [{ node: 0, current: 0.1 }] }));
    const res = r.ratings.find((x) => x.key === 'rectifier-reservoir')!;
    expect(res.limit).toBeCloseTo(20e-6, 12);
    expect(res.status).toBe('over');
    expect(r.ratings.find((x) => x.key === 'rectifier-peak-current')!.status).not.toBe('not-checked');
    expect(r.rectifier.heater).toEqual({ voltage: 5, current: 2 });
    expect(r.cautions.join(' ')).toMatch(/heater budget/);
    // a vacuum rectifier drops far more than silicon at the same current
    const si = solveSupply(base({ reservoir: { capacitance: 100e-6 }, sections: [], loads: [{ node: 0, current: 0.1 }] }));
    expect(si.nodes[0]!.dc - r.nodes[0]!.dc).toBeGreaterThan(20);
  });

  it('warns of a missing bleeder and estimates the discharge time with one', () => {
    expect(solveSupply(base()).cautions.join(' ')).toMatch(/No bleeder/);
    const withBleeder = solveSupply(base({ loads: [{ node: 1, current: 0.05 }, { node: 0, resistance: 100e3 }] }));
    expect(withBleeder.cautions.join(' ')).toMatch(/Bleeders discharge/);
  });

  it('choke input: flags a choke below the critical inductance R/(3ω) (common practice)', () => {
    const c = base({
      reservoir: null,
      sections: [
        { kind: 'choke', inductance: 2, resistance: 50 },
        { kind: 'capacitor', capacitance: 47e-6 },
      ],
      loads: [{ node: 0, current: 0.02 }],
    });
    const r = solveSupply(c);
    const crit = r.chokes[0]!.criticalInductance!;
    expect(crit).toBeGreaterThan(2);
    expect(r.cautions.join(' ')).toMatch(/critical inductance/);
  });

  it('converges with the step count (computed: 256 against 2048 steps per half cycle)', () => {
    const a = solveSupply(base(), { steadyStateOnly: true });
    const b = solveSupply(base(), { steadyStateOnly: true, stepsPerHalfCycle: 2048 });
    expect(Math.abs(a.nodes[0]!.dc - b.nodes[0]!.dc) / b.nodes[0]!.dc).toBeLessThan(1e-4);
    expect(Math.abs(a.nodes[0]!.ripplePeakToPeak - b.nodes[0]!.ripplePeakToPeak) / b.nodes[0]!.ripplePeakToPeak).toBeLessThan(0.01);
    expect(Math.abs(a.rectifierPeakCurrent - b.rectifierPeakCurrent) / b.rectifierPeakCurrent).toBeLessThan(0.01);
  });

  it('returns periodic waveforms of the reservoir and the last node over three mains cycles', () => {
    const r = solveSupply(base());
    const w = r.waveform.fullDrive;
    expect(w.t.length).toBe(w.reservoir.length);
    expect(w.t[w.t.length - 1]!).toBeCloseTo(3 / 50, 6);
    expect(Math.max(...w.reservoir)).toBeCloseTo(r.nodes[0]!.fullDrive.max, 6);
    expect(Math.min(...w.last)).toBeGreaterThan(0);
  });
});
