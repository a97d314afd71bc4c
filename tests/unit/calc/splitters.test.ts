// Phase splitters against the handbook small-signal relations, evaluated with the engine's own µ and ra at the
// operating point it found. The relations are the standard linear-triode results for these circuits
// (common practice; derived from the triode equation ia·ra = µ·vgk + vak, as in Langford-Smith, Radiotron
// Designer's Handbook, 4th ed., chapter on phase inverters — chapter attribution from memory).
import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { analyzePushPullDriven, sineGridDrives } from '@/lib/calc/stages/push-pull-output';
import { stageInputSchema, type StageInputRaw } from '@/lib/validation/stage';

// Koren's published parameter sets (tube-models.md §3.1, Koren 1996)
const AX7 = { model: 'koren-triode', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300, capacitances: { cgk: '2.3p', cga: '2.4p', cak: '0.9p' } } as const;
const AT7 = { model: 'koren-triode', mu: 60, ex: 1.35, kg1: 460, kp: 300, kvb: 300, capacitances: { cgk: '2.3p', cga: '2.2p', cak: '1p' } } as const;
const AU7 = { model: 'koren-triode', mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300, capacitances: { cgk: '2.3p', cga: '2.2p', cak: '1p' } } as const;

const analyze = (raw: StageInputRaw) => analyzeStage(stageInputSchema.parse(raw));
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('long-tailed pair', () => {
  // grids at 0 V, tail to −150 V, no bias resistor: the tail is a plain resistor Rt from the joined cathodes
  const ltp = (ra1: number, ra2: number, rt: number) =>
    analyze({
      topology: 'long-tailed-pair',
      tube: AT7,
      supply: 300,
      gridResistor: '470k',
      plateResistors: { inverting: ra1, nonInverting: ra2 },
      tail: { kind: 'resistor', biasResistor: 0, tailResistor: rt, tailSupply: -150 },
      grids: { kind: 'dc', gridVoltage: 0 },
      secondGridBypass: '1u',
      drive: { amplitude: 0.5, frequency: 1000 },
    });

  it('gain to each plate: A1 = −µR·(a + mRt)/(a·(a + 2mRt)), A2 = µR·mRt/(a·(a + 2mRt)), a = ra + R, m = µ + 1', () => {
    const rt = 47e3;
    const r = 100e3;
    const a = ltp(r, r, rt);
    const { mu, ra } = a.smallSignal;
    const aa = ra + r;
    const m = mu + 1;
    const a1 = (-mu * r * (aa + m * rt)) / (aa * (aa + 2 * m * rt));
    const a2 = (mu * r * m * rt) / (aa * (aa + 2 * m * rt));
    expect(rel(a.outputs!.inverting!.gain, a1)).toBeLessThan(0.01);
    expect(rel(a.outputs!['non-inverting']!.gain, a2)).toBeLessThan(0.01);
    expect(a.smallSignal.gain).toBe(a.outputs!.inverting!.gain);
  });

  it('equal plate resistors and a finite tail: the non-inverting output is low by (µ+1)Rt/(ra + R + (µ+1)Rt)', () => {
    for (const rt of [33e3, 68e3, 220e3]) {
      const r = 82e3;
      const a = ltp(r, r, rt);
      const { mu, ra } = a.smallSignal;
      const ratio = ((mu + 1) * rt) / (ra + r + (mu + 1) * rt);
      const ours = a.outputs!['non-inverting']!.gain / -a.outputs!.inverting!.gain;
      expect(rel(ours, ratio)).toBeLessThan(0.01);
      // the balance figure is the same imbalance in dB (at 1 kHz the capacitances do not matter yet)
      expect(Math.abs(a.balance!.ratioDb - 20 * Math.log10(ratio))).toBeLessThan(0.05);
    }
    // a longer tail balances better (common practice)
    expect(Math.abs(ltp(82e3, 82e3, 220e3).balance!.ratioDb)).toBeLessThan(Math.abs(ltp(82e3, 82e3, 33e3).balance!.ratioDb));
  });

  it('trimming the non-inverting plate resistor up by the imbalance improves the balance', () => {
    const r = 82e3;
    const rt = 47e3;
    const a = ltp(r, r, rt);
    const { mu, ra } = a.smallSignal;
    const ratio = ((mu + 1) * rt) / (ra + r + (mu + 1) * rt);
    // the imbalance here is about 4 %: a 4 % larger non-inverting plate resistor must bring the ratio toward 0 dB
    const trimmed = ltp(r, r * 1.04, rt);
    expect(Math.abs(trimmed.balance!.ratioDb)).toBeLessThan(Math.abs(20 * Math.log10(ratio)));
  });

  it('a current-source tail balances the outputs (infinite tail)', () => {
    const a = analyze({
      topology: 'long-tailed-pair',
      tube: AX7,
      supply: 350,
      gridResistor: '1M',
      plateResistors: { inverting: '100k', nonInverting: '100k' },
      tail: { kind: 'current-source', current: '1.6m' },
      grids: { kind: 'dc', gridVoltage: 60 },
      secondGridBypass: '470n',
      drive: { amplitude: 1, frequency: 1000 },
    });
    expect(Math.abs(a.balance!.ratioDb)).toBeLessThan(0.01);
    expect(a.tailCurrent!).toBeCloseTo(1.6e-3, 8);
    // each section takes half the tail (equal plate loads)
    expect(rel(a.perTube[0]!.plateCurrent, 0.8e-3)).toBeLessThan(1e-6);
    // output impedance of each plate: Ra ∥ (ra + (µ+1)·Z_other), Z_other = the other section seen at the cathode,
    // ra/(µ+1) with its plate load: (ra + Ra)/(µ+1) → Zout = Ra ∥ (2ra + Ra)
    const { ra } = a.smallSignal;
    const r = 100e3;
    const z = 1 / (1 / r + 1 / (2 * ra + r));
    expect(rel(a.outputs!.inverting!.outputImpedance, z)).toBeLessThan(0.01);
  });
});

describe('split-load (concertina)', () => {
  const sl = (raw: Partial<StageInputRaw> = {}) =>
    analyze({
      topology: 'split-load',
      tube: AU7,
      supply: 350,
      gridResistor: '1M',
      plateResistor: '22k',
      cathodeResistor: '22k',
      biasResistor: 0,
      bias: { kind: 'dc-coupled', gridVoltage: 95 },
      drive: { amplitude: 2, frequency: 1000 },
      ...raw,
    } as StageInputRaw);

  it('gain just under 1 to each output: A = µR/(ra + R + (µ+1)Rk)', () => {
    const a = sl();
    const { mu, ra } = a.smallSignal;
    const r = 22e3;
    const g = (mu * r) / (ra + r + (mu + 1) * r);
    expect(rel(a.outputs!.plate!.gain, -g)).toBeLessThan(0.01);
    expect(rel(a.outputs!.cathode!.gain, g)).toBeLessThan(0.01);
    for (const o of [a.outputs!.plate!, a.outputs!.cathode!]) {
      expect(Math.abs(o.gain)).toBeGreaterThan(0.8);
      expect(Math.abs(o.gain)).toBeLessThan(1);
    }
    // equal loads: balanced within 0.01 dB and in antiphase
    expect(Math.abs(a.balance!.ratioDb)).toBeLessThan(0.01);
    expect(Math.abs(a.balance!.phaseErrorDeg)).toBeLessThan(0.1);
  });

  it('output impedances: plate R ∥ (ra + (µ+1)Rk), cathode Rk ∥ (ra + R)/(µ+1)', () => {
    const a = sl();
    const { mu, ra } = a.smallSignal;
    const r = 22e3;
    const par = (x: number, y: number) => (x * y) / (x + y);
    expect(rel(a.outputs!.plate!.outputImpedance, par(r, ra + (mu + 1) * r))).toBeLessThan(0.01);
    expect(rel(a.outputs!.cathode!.outputImpedance, par(r, (ra + r) / (mu + 1)))).toBeLessThan(0.01);
    expect(a.outputs!.plate!.outputImpedance).toBeGreaterThan(10 * a.outputs!.cathode!.outputImpedance);
  });

  it('headroom names the side that clips first', () => {
    const a = sl({ drive: { amplitude: 0, frequency: 1000 } });
    const h = a.largeSignal.headroom;
    expect(['grid-conduction', 'plate-saturation', 'cutoff']).toContain(h.limitedBy);
    expect(h.side).toBeTruthy();
    expect(h.explanation!.length).toBeGreaterThan(20);
    // driven past the limit: a warning says so
    const over = sl({ drive: { amplitude: h.maxDrive * 1.3, frequency: 1000 } });
    expect(over.warnings.some((w) => w.includes('beyond the headroom limit'))).toBe(true);
  });
});

describe('headroom of a bootstrapped split-load stage (12AU7, 22 k loads, 1k5 bias resistor)', () => {
  const boot = (amplitude: number) =>
    analyze({
      topology: 'split-load',
      tube: AU7,
      supply: 350,
      gridResistor: '1M',
      plateResistor: '22k',
      cathodeResistor: '22k',
      biasResistor: '1k5',
      bias: { kind: 'bootstrapped' },
      load: { resistance: '220k', couplingCapacitor: '100n' },
      drive: { amplitude, frequency: 1000 },
    });

  it('the grid reaches the cathode first (the cathode side), and distortion grows fast past that drive', () => {
    const h = boot(0).largeSignal.headroom;
    expect(h.limitedBy).toBe('grid-conduction');
    expect(h.side).toBe('cathode');
    const beyond = (a: ReturnType<typeof boot>) => a.warnings.some((w) => w.includes('beyond the headroom limit'));
    const at = (f: number) => boot(f * h.maxDrive);
    const half = at(0.5);
    const below = at(0.97);
    const past = at(1.5);
    expect(beyond(below)).toBe(false);
    expect(beyond(at(1.05))).toBe(true);
    // below the limit THD grows about in proportion to the drive (second-order curvature); past it, much faster
    const thd = (a: ReturnType<typeof boot>) => a.outputs!.cathode!.thdPercent;
    expect(thd(below) / thd(half)).toBeLessThan(2.2);
    expect(thd(past) / thd(below)).toBeGreaterThan(3);
  });
});

describe('push-pull pair driven by two grid waveforms', () => {
  const pp = stageInputSchema.parse({
    topology: 'push-pull-output',
    tube: { model: 'koren-triode', mu: 4.2, ex: 1.4, kg1: 1500, kp: 60, kvb: 300 },
    supply: 300,
    gridResistor: '100k',
    class: 'A',
    plateToPlateImpedance: '5k',
    bias: { kind: 'fixed', fixedBias: -45 },
    drive: { amplitude: 20, frequency: 1000 },
  });
  if (pp.topology !== 'push-pull-output') throw new Error('fixture');

  it('antiphase drives reproduce the ideal-drive analysis (computed, same engine: a consistency check)', () => {
    const ideal = analyzeStage(pp);
    const driven = analyzePushPullDriven(pp, sineGridDrives({ amplitude: 20, phaseDeg: 0 }, { amplitude: 20, phaseDeg: 180 }));
    expect(rel(driven.outputAmplitude, ideal.largeSignal.outputAmplitude)).toBeLessThan(1e-6);
    expect(Math.abs(driven.thdPercent - ideal.largeSignal.thdPercent)).toBeLessThan(1e-4);
  });

  it('an unbalanced drive lowers the output by the missing half and adds even harmonics (push-pull cancellation lost)', () => {
    const bal = analyzePushPullDriven(pp, sineGridDrives({ amplitude: 20, phaseDeg: 0 }, { amplitude: 20, phaseDeg: 180 }));
    const unb = analyzePushPullDriven(pp, sineGridDrives({ amplitude: 20, phaseDeg: 0 }, { amplitude: 16, phaseDeg: 180 }));
    // in class A each grid contributes about equally: 20 + 16 of 40 → about 0.9
    expect(unb.outputAmplitude / bal.outputAmplitude).toBeGreaterThan(0.85);
    expect(unb.outputAmplitude / bal.outputAmplitude).toBeLessThan(0.95);
    const h2 = (r: typeof bal) => r.harmonics[0]!.amplitude / r.outputAmplitude;
    expect(h2(unb)).toBeGreaterThan(10 * h2(bal));
  });

  it('refuses drives of different lengths', () => {
    expect(() => analyzePushPullDriven(pp, { grid1: new Float64Array(64), grid2: new Float64Array(32) })).toThrow(/same length/);
  });
});
