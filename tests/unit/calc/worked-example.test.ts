import { describe, expect, it } from 'vitest';
import { analyzeStage, formulas } from '@/lib/calc';
import { stageInputSchema, type StageInputRaw } from '@/lib/validation/stage';

// ref §6A: Koren 12AX7, B+ 330 V, Ra 100 kΩ, Rk 1.5 kΩ, no external load
// (source: textbook "Electronics" ch. 6 §6.2; circuit values inferred [C] in the reference sheet)
const tube = {
  model: 'koren-triode' as const,
  mu: 100,
  ex: 1.4,
  kg1: 1060,
  kp: 600,
  kvb: 300,
  capacitances: { cgk: 1.6e-12, cga: 1.7e-12, cak: 0.46e-12 },
};
const stage = (bypass: number | null, extra: Partial<StageInputRaw> = {}) =>
  stageInputSchema.parse({
    topology: 'common-cathode',
    tube,
    supply: 330,
    gridResistor: '1M',
    plateResistor: '100k',
    bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: bypass },
    drive: { amplitude: 0.5 },
    ...extra,
  });
const rel = (a: number, b: number) => Math.abs(a / b - 1);

// Published values are asserted at the precision the book prints them: within one unit of the last printed digit
// (the book's rounding rule is not stated). Values tagged [C] were computed for the reference sheet from the same
// equations: they are cross-checks of our arithmetic, not outside checks.
const withinLastDigit = (value: number, printed: number, unit: number) => Math.abs(value - printed) <= unit + 1e-12;

describe('worked example §6A: published values (outside check)', () => {
  const unbypassed = analyzeStage(stage(null));
  const bypassed = analyzeStage(stage(22e-6));

  it('DC point: IPC = 1.07 mA, VPC = 221 V, VGC = −1.61 V (source: textbook "Electronics" ch. 6 §6.2, via ref §6A)', () => {
    const op = unbypassed.operatingPoint;
    expect(withinLastDigit(op.plateCurrent * 1e3, 1.07, 0.01)).toBe(true);
    expect(withinLastDigit(op.plateCathodeVoltage, 221, 1)).toBe(true);
    expect(withinLastDigit(op.gridCathodeVoltage, -1.61, 0.01)).toBe(true);
  });

  it('gm = 1880 µS (same source)', () => {
    expect(withinLastDigit(unbypassed.smallSignal.gm * 1e6, 1880, 10)).toBe(true);
  });

  it("book's method (µ = 100, rp = µ/gm): rp = 53.3 kΩ, gain 33 unbypassed and 65 bypassed (same source)", () => {
    const gm = unbypassed.smallSignal.gm;
    const rp = 100 / gm;
    expect(withinLastDigit(rp / 1e3, 53.3, 0.1)).toBe(true);
    expect(withinLastDigit(-formulas.gainUnbypassed(100, rp, 100e3, 1500), 33, 1)).toBe(true);
    expect(withinLastDigit(-formulas.gainBypassed(100, rp, 100e3), 65, 1)).toBe(true);
  });
});

describe('worked example §6A: computed cross-checks [C] (not outside checks)', () => {
  const unbypassed = analyzeStage(stage(null));
  const bypassed = analyzeStage(stage(22e-6));

  it('DC point 1.0753 mA, 221.0 V, −1.611 V to ±1 % (ref §6A reproduction [C])', () => {
    const op = unbypassed.operatingPoint;
    expect(rel(op.plateCurrent, 1.0753e-3)).toBeLessThan(0.01);
    expect(rel(op.plateCathodeVoltage, 221.0)).toBeLessThan(0.01);
    expect(rel(op.gridCathodeVoltage, -1.611)).toBeLessThan(0.01);
    // the point lies on the load line and on the tube curve (consistency, not a source value)
    expect(op.plateVoltage).toBeCloseTo(330 - op.plateCurrent * 100e3, 9);
    expect(op.cathodeVoltage).toBeCloseTo(op.plateCurrent * 1500, 9);
  });

  it('gm 1877.6 µS and local µ = 91.98, ra = 48.97 kΩ (ref §6A [C])', () => {
    const s = unbypassed.smallSignal;
    expect(rel(s.gm, 1877.6e-6)).toBeLessThan(0.01);
    expect(rel(s.mu, 91.98)).toBeLessThan(0.01);
    expect(rel(s.ra, 48.97e3)).toBeLessThan(0.01);
  });

  it('local-model gains −31.9 unbypassed and −61.7 bypassed (ref §6A [C], numerical perturbation)', () => {
    expect(rel(unbypassed.smallSignal.gain, -31.9)).toBeLessThan(0.01);
    expect(rel(bypassed.smallSignal.gain, -61.7)).toBeLessThan(0.01);
    expect(unbypassed.smallSignal.gain).toBeLessThan(0);
  });

  it('book-method gains 32.8 / 65.3 with µ = 100 and rp = µ/gm (ref §6A [C]; handbook formula RDH4 [M])', () => {
    const gm = unbypassed.smallSignal.gm;
    const rp = 100 / gm;
    expect(rel(-formulas.gainUnbypassed(100, rp, 100e3, 1500), 32.8)).toBeLessThan(0.01);
    expect(rel(-formulas.gainBypassed(100, rp, 100e3), 65.3)).toBeLessThan(0.01);
  });

  it('engine gains equal the §5 formulas with the local µ and ra (handbook formula RDH4 [M])', () => {
    const { mu, ra } = unbypassed.smallSignal;
    expect(rel(unbypassed.smallSignal.gain, formulas.gainUnbypassed(mu, ra, 100e3, 1500))).toBeLessThan(0.005);
    expect(rel(bypassed.smallSignal.gain, formulas.gainBypassed(mu, ra, 100e3))).toBeLessThan(0.005);
    expect(rel(unbypassed.smallSignal.outputImpedance, formulas.plateOutputImpedance(mu, ra, 100e3, 1500))).toBeLessThan(0.01);
    expect(rel(bypassed.smallSignal.outputImpedance, formulas.plateOutputImpedance(mu, ra, 100e3))).toBeLessThan(0.01);
  });
});

describe('§6C bypass, Miller and coupling checks (ref §6C [C], computed)', () => {
  it("Rk' 754 Ω, f_z 4.82 Hz, f_p 9.59 Hz with Ck 22 µF (ref §6C [C], formulas ref §5)", () => {
    const c = formulas.cathodeBypassCorners(100, 53.3e3, 100e3, 1500, 22e-6);
    expect(rel(c.rkEff, 754)).toBeLessThan(0.005);
    expect(rel(c.zero, 4.82)).toBeLessThan(0.005);
    expect(rel(c.pole, 9.59)).toBeLessThan(0.005);
  });

  it('Miller Cin 114 pF with Cgk 1.6 pF, Cgp 1.7 pF, |Av| 65.2 (ref §6C [C])', () => {
    expect(rel(formulas.millerCapacitance(1.6e-12, 1.7e-12, -65.2), 114e-12)).toBeLessThan(0.005);
  });

  it('engine Miller capacitance follows Cgk + Cga·(1 + |Av|) (ref §5, handbook formula)', () => {
    const r = analyzeStage(stage(22e-6));
    const expected = formulas.millerCapacitance(1.6e-12, 1.7e-12, r.smallSignal.gain);
    expect(rel(r.smallSignal.inputCapacitance, expected)).toBeLessThan(0.01);
  });

  it('engine response follows the bypass zero/pole expression (ref §5; local µ, ra)', () => {
    const r = analyzeStage(stage(22e-6));
    const { mu, ra, gain } = r.smallSignal;
    const c = formulas.cathodeBypassCorners(mu, ra, 100e3, 1500, 22e-6);
    for (const p of r.smallSignal.response.filter((_, i) => i % 20 === 0)) {
      const x = p.frequency / c.zero;
      // |A(f)| = |A_mid|·|1 + j·f/f_z| / |Rk/Rk' + j·f/f_z|
      const mag = (Math.abs(gain) * Math.hypot(1, x)) / Math.hypot(1500 / c.rkEff, x);
      expect(Math.abs(p.magnitudeDb - 20 * Math.log10(mag))).toBeLessThan(0.05);
    }
    expect(r.smallSignal.lowCutoff).not.toBeNull();
    expect(r.smallSignal.lowCutoff!).toBeGreaterThan(c.zero);
    expect(r.smallSignal.lowCutoff!).toBeLessThan(c.pole);
  });

  it('coupling capacitor corner is 1/(2π·Cc·(Zout + Rg)) (ref §5)', () => {
    const r = analyzeStage(stage(null, { load: { resistance: '1M', couplingCapacitor: '10n' } }));
    const expected = formulas.couplingCutoff(10e-9, r.smallSignal.outputImpedance, 1e6);
    expect(rel(r.smallSignal.lowCutoff!, expected)).toBeLessThan(0.01);
  });

  it('source resistance × Miller capacitance sets the high corner (ref §5: f_H ≈ 1/(2π·Rs·Cin))', () => {
    const r = analyzeStage(stage(22e-6, { sourceResistance: '47k' }));
    const rs = (47e3 * 1e6) / (47e3 + 1e6);
    const fh = 1 / (2 * Math.PI * rs * r.smallSignal.inputCapacitance);
    expect(rel(r.smallSignal.highCutoff!, fh)).toBeLessThan(0.02);
    expect(analyzeStage(stage(22e-6, { tube: { ...tube, capacitances: undefined } })).smallSignal.highCutoff).toBeNull();
  });
});

describe('cathode follower formulas (ref §5, handbook formula RDH4 [M])', () => {
  it('gain µRk/(ra + (µ+1)Rk) and Zout Rk ∥ ra/(µ+1) with the local µ and ra', () => {
    const r = analyzeStage(
      stageInputSchema.parse({
        topology: 'cathode-follower',
        tube: { model: 'koren-triode', mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300 },
        supply: 300,
        gridResistor: '1M',
        bias: { kind: 'dc-coupled', gridVoltage: 100 },
        cathodeResistor: '22k',
        drive: { amplitude: 1 },
      }),
    );
    const { mu, ra, gain, outputImpedance } = r.smallSignal;
    expect(rel(gain, formulas.followerGain(mu, ra, 22e3))).toBeLessThan(0.005);
    expect(rel(outputImpedance, formulas.followerOutputImpedance(mu, ra, 22e3))).toBeLessThan(0.01);
  });
});
