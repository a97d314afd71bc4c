import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { fivePoint, harmonicAmplitudes, thdFromAmplitudes, threePoint } from '@/lib/calc/distortion';
import { stageInputSchema } from '@/lib/validation/stage';

// ref §7: 3-point [M: RDH4], 5-point (Espley 1933) re-derived [C]; FFT of one cycle is the reference.
const cycle = (f: (x: number) => number, n = 256) => Array.from({ length: n }, (_, k) => f(Math.cos((2 * Math.PI * k) / n)));
const points = (f: (x: number) => number) => [f(1), f(0.5), f(0), f(-0.5), f(-1)] as const;

describe('load-line distortion estimates', () => {
  it('a linear characteristic gives zero distortion by all three methods (ref §7 sanity check [C])', () => {
    const f = (x: number) => 2 + 3 * x;
    const [imax, ix, io, iy, imin] = points(f);
    expect(threePoint(imax, io, imin).thd).toBe(0);
    expect(fivePoint(imax, ix, io, iy, imin).thd).toBeCloseTo(0, 14);
    expect(thdFromAmplitudes(harmonicAmplitudes(cycle(f)))).toBeLessThan(1e-12);
  });

  it('the 3-point method is exact for a square-law characteristic (ref §7)', () => {
    const f = (x: number) => 1 + 0.8 * x + 0.1 * x * x;
    const [imax, , io, , imin] = points(f);
    const amps = harmonicAmplitudes(cycle(f));
    const p3 = threePoint(imax, io, imin);
    expect(p3.thd).toBeCloseTo((amps[2] ?? 0) / (amps[1] ?? 1), 12);
    expect(p3.dcShift).toBeCloseTo((amps[0] ?? 0) - 1, 12);
  });

  it('the 5-point method is exact up to a fourth-degree characteristic (ref §7 [C])', () => {
    const f = (x: number) => 1 + x + 0.2 * x ** 2 - 0.15 * x ** 3 + 0.05 * x ** 4;
    const [imax, ix, io, iy, imin] = points(f);
    const amps = harmonicAmplitudes(cycle(f));
    const p5 = fivePoint(imax, ix, io, iy, imin);
    expect(p5.thd).toBeCloseTo(thdFromAmplitudes(amps), 12);
    expect(p5.b0).toBeCloseTo((amps[0] ?? 0) - f(0), 12);
    // cos³θ = (3cosθ + cos3θ)/4: the third harmonic is −0.15/4, which the 3-point method cannot see
    expect(p5.b3).toBeCloseTo(-0.0375, 12);
    expect(Math.abs(p5.b3)).toBeCloseTo(amps[3] ?? 0, 12);
  });

  it('FFT amplitudes recover a known spectrum', () => {
    const n = 256;
    const x = Array.from({ length: n }, (_, k) => 0.5 + 3 * Math.sin((2 * Math.PI * k) / n) + 0.3 * Math.cos((6 * Math.PI * k) / n));
    const amps = harmonicAmplitudes(x);
    expect(amps[0]).toBeCloseTo(0.5, 12);
    expect(amps[1]).toBeCloseTo(3, 12);
    expect(amps[3]).toBeCloseTo(0.3, 12);
    expect(thdFromAmplitudes(amps)).toBeCloseTo(0.1, 12);
  });

  // ref §7 reports 5-point within 0.05 % absolute of the FFT for its 2A3/300B cases [C]; this stage is not one
  // of them, so the check here is looser (5 % relative, engineering judgement).
  it('on a real stage the 5-point estimate tracks the FFT', () => {
    const r = analyzeStage(
      stageInputSchema.parse({
        topology: 'single-ended-output',
        tube: { model: 'koren-triode', mu: 4.2, ex: 1.4, kg1: 1500, kp: 60, kvb: 300 },
        supply: 260,
        gridResistor: '100k',
        primaryImpedance: '2k5',
        primaryResistance: 0,
        bias: { kind: 'fixed', fixedBias: -45 },
        drive: { amplitude: 20 },
      }),
    );
    const ls = r.largeSignal;
    expect(ls.thdPercent).toBeGreaterThan(0.3);
    expect(Math.abs(ls.thd5PointPercent / ls.thdPercent - 1)).toBeLessThan(0.05);
    expect(Math.abs(ls.thd3PointPercent / ls.thdPercent - 1)).toBeLessThan(0.2);
    expect(ls.harmonics.map((h) => h.order)).toEqual([2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(ls.outputPower!).toBeGreaterThan(0);
  });
});
