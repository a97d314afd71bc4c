// Loop-stability math on loops whose margins have closed forms.
// Three equal real poles: the phase reaches −180° where each pole gives 60°, ω = √3·p, and |T| = K/8 there, so
// K = 8 is the limit of stability (a standard textbook result, common practice). The square-wave check uses a
// single pole, whose step response has no overshoot and a rise set by the pole (common practice).
import { describe, expect, it } from 'vitest';
import { bandwidth, loopStability, responsePeak, squareWaveResponse, type Complex } from '@/lib/calc/feedback/stability';
import { logFrequencies } from '@/lib/calc/transformer';

const cdiv = (a: Complex, b: Complex): Complex => {
  const d = b.re * b.re + b.im * b.im;
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d };
};
const cmul = (a: Complex, b: Complex): Complex => ({ re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re });

/** K · s³/(s+pl)³ (three coupling time constants) · 1/(1+s/ph)³ */
function loop(k: number, fl: number, fh: number) {
  return (f: number): Complex => {
    let t: Complex = { re: k, im: 0 };
    for (let i = 0; i < 3; i++) {
      t = cmul(t, cdiv({ re: 0, im: f }, { re: fl, im: f }));
      t = cdiv(t, { re: 1, im: f / fh });
    }
    return t;
  };
}

describe('loop stability', () => {
  const freqs = logFrequencies(1, 1e6, 40);
  it('three equal high poles: phase crossover at √3·fp, gain margin 20·log(8/K), phase margin in closed form', () => {
    for (const k of [3, 6, 7.5]) {
      const at = loop(k, 0.01, 50e3);
      const s = loopStability(freqs, freqs.map(at), at);
      expect(s.high.phaseCrossoverFrequency! / (Math.sqrt(3) * 50e3)).toBeCloseTo(1, 4);
      expect(s.high.gainMargin!).toBeCloseTo(20 * Math.log10(8 / k), 3);
      const wc = 50e3 * Math.sqrt(Math.pow(k, 2 / 3) - 1);
      expect(s.high.unityGainFrequency! / wc).toBeCloseTo(1, 4);
      expect(s.high.phaseMargin!).toBeCloseTo(180 - (3 * Math.atan(wc / 50e3) * 180) / Math.PI, 2);
    }
  });

  it('verdicts: stable, may ring (< 45°), will oscillate (< 0°), positive feedback', () => {
    const v = (k: number) => {
      const at = loop(k, 0.5, 40e3);
      return loopStability(freqs, freqs.map(at), at);
    };
    expect(v(2).verdict).toBe('stable');
    expect(v(6).verdict).toBe('may-ring');
    expect(v(6).remedies.join(' ')).toMatch(/step network/);
    expect(v(12).verdict).toBe('will-oscillate');
    expect(v(12).phaseMargin!).toBeLessThan(0);
    const neg = (f: number) => {
      const t = loop(5, 0.5, 40e3)(f);
      return { re: -t.re, im: -t.im };
    };
    expect(loopStability(freqs, freqs.map(neg), neg).verdict).toBe('positive-feedback');
    expect(v(0.5).verdict).toBe('no-loop-gain');
  });

  it('low end: three equal coupling poles give the mirror-image margins', () => {
    const at = loop(6, 10, 1e9);
    const s = loopStability(freqs, freqs.map(at), at);
    expect(s.low.phaseCrossoverFrequency! / (10 / Math.sqrt(3))).toBeCloseTo(1, 4);
    expect(s.low.gainMargin!).toBeCloseTo(20 * Math.log10(8 / 6), 3);
  });

  it('closed-loop peak, bandwidth and square wave of a single pole and of a resonant pair', () => {
    const pole = (f: number): Complex => cdiv({ re: 1, im: 0 }, { re: 1, im: f / 20e3 });
    const bw = bandwidth(freqs, freqs.map(pole), pole);
    // |H(1 kHz)| is 0.00125 dB below 1, so the −3 dB point sits a hair above 20 kHz (computed)
    expect(bw.high! / 20e3).toBeCloseTo(1, 2);
    expect(bw.low).toBeNull();
    const sq = squareWaveResponse(pole, 1000);
    expect(sq.overshootPercent).toBeLessThan(0.5);
    // second-order with ζ = 0.2: peak 1/(2ζ√(1−ζ²)) = 2.55 (8.1 dB), step overshoot exp(−πζ/√(1−ζ²)) = 52.7 % (common practice)
    const z = 0.2;
    const f0 = 30e3;
    const pair = (f: number): Complex => cdiv({ re: 1, im: 0 }, { re: 1 - (f / f0) ** 2, im: (2 * z * f) / f0 });
    const fine = logFrequencies(1, 1e6, 400);
    expect(responsePeak(fine, fine.map(pair)).db).toBeCloseTo(20 * Math.log10(1 / (2 * z * Math.sqrt(1 - z * z))), 1);
    const ring = squareWaveResponse(pair, 1000, { maxFrequency: 2e6, samples: 2048 });
    expect(ring.overshootPercent).toBeGreaterThan(45);
    expect(ring.overshootPercent).toBeLessThan(56);
  });
});
