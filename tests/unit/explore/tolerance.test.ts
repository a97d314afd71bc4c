// Tolerance runs: checked against a closed-form answer (the small-signal triode model) and for reproducibility.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeStage, korenTriodeCurrent } from '@/lib/calc';
import { prepareTolerance, runToleranceTrials, scaleEmission, summarizeTolerance, trialInput } from '@/lib/calc/explore';
import { stageInputSchema, type StageInput } from '@/lib/validation/stage';

const fixture = (name: string): StageInput =>
  stageInputSchema.parse(JSON.parse(readFileSync(path.resolve(__dirname, '../../fixtures/stages', `${name}.json`), 'utf8')));

const std = (xs: number[]) => {
  const m = xs.reduce((s, x) => s + x, 0) / xs.length;
  return Math.sqrt(xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1));
};

describe('tolerance run of a cathode-biased triode', () => {
  const input = fixture('cc-12ax7-bypassed');
  const nominal = analyzeStage(input);
  const zero = { minus: 0, plus: 0 };

  it('spreads the plate current as the small-signal model predicts from the resistor tolerances alone', () => {
    // Closed form (textbook small-signal triode: a µ·vgk source behind ra, cathode degeneration):
    // with Vgk = −Ia·Rk and Vak = B − Ia(Rp + Rk), dIa = gm·dVgk + dVak/ra gives
    //   ∂Ia/∂Rk = −Ia(µ + 1) / (ra + Rp + (µ + 1)Rk),   ∂Ia/∂Rp = −Ia / (ra + Rp + (µ + 1)Rk).
    // A part uniform within ±t has σ = t·R/√3; the two parts are independent, so the variances add.
    const trials = 4000;
    const t = 0.05;
    const setup = prepareTolerance(input, {
      trials,
      seed: 7,
      distribution: 'uniform',
      parts: { plateResistor: { minus: t, plus: t }, 'bias.cathodeResistor': { minus: t, plus: t }, 'bias.cathodeBypass': zero, gridResistor: zero },
      mains: zero,
      tubeSpread: 0,
    });
    const block = runToleranceTrials(setup, 0, trials);
    const ia = Array.from(block.metrics[setup.metrics.indexOf('plateCurrent')] as Float64Array);
    const { mu, ra } = nominal.smallSignal;
    const I = nominal.operatingPoint.plateCurrent;
    const rp = 100e3;
    const rk = 1500;
    const den = ra + rp + (mu + 1) * rk;
    const sRk = (t * rk) / Math.sqrt(3);
    const sRp = (t * rp) / Math.sqrt(3);
    const expected = Math.sqrt(((I * (mu + 1)) / den) ** 2 * sRk ** 2 + (I / den) ** 2 * sRp ** 2);
    const measured = std(ia);
    // sampling error of a standard deviation ≈ σ/√(2n) ≈ 1.1 % here; 4 % leaves room for the linearisation
    expect(Math.abs(measured / expected - 1)).toBeLessThan(0.04);
    const mean = ia.reduce((s, x) => s + x, 0) / ia.length;
    expect(Math.abs(mean - I)).toBeLessThan((4 * expected) / Math.sqrt(trials));
    expect(block.failures).toEqual({});
  });

  it('gives the same builds for the same seed however the trials are split', () => {
    const setup = prepareTolerance(input, { trials: 300, seed: 42 });
    const whole = summarizeTolerance(setup, [runToleranceTrials(setup, 0, 300)]);
    const split = summarizeTolerance(setup, [runToleranceTrials(setup, 170, 300), runToleranceTrials(setup, 0, 170)]);
    expect(split).toEqual(whole);
    const other = summarizeTolerance(prepareTolerance(input, { trials: 300, seed: 43 }), [runToleranceTrials(prepareTolerance(input, { trials: 300, seed: 43 }), 0, 300)]);
    expect(other.metrics[0]?.stats?.mean).not.toBe(whole.metrics[0]?.stats?.mean);
  });

  it('draws every factor within its band and marks the defaults as common practice', () => {
    const setup = prepareTolerance(input, { trials: 500, seed: 3, resistorTolerance: 0.01 });
    for (let i = 0; i < 500; i++) {
      const { factors } = trialInput(setup, i);
      setup.parts.forEach((p, k) => {
        expect(factors[k]).toBeGreaterThanOrEqual(1 - p.minus - 1e-12);
        expect(factors[k]).toBeLessThanOrEqual(1 + p.plus + 1e-12);
      });
      expect(Math.abs((factors.at(-1) as number) - 1)).toBeLessThanOrEqual(0.2 + 1e-12);
    }
    const s = summarizeTolerance(setup, [runToleranceTrials(setup, 0, 500)]);
    expect(s.parts.find((p) => p.path === 'plateResistor')).toMatchObject({ minus: 0.01, source: 'common practice' });
    expect(s.parts.find((p) => p.path === 'bias.cathodeBypass')).toMatchObject({ minus: 0.2, plus: 0.2 });
    // plate current percentiles are ordered and bracket the nominal value
    const ia = s.metrics.find((m) => m.key === 'plateCurrent')!;
    const p = ia.stats!.percentiles.map((x) => x.value);
    expect([...p].sort((a, b) => a - b)).toEqual(p);
    expect(p[0]).toBeLessThan(ia.nominal!);
    expect(p[4]).toBeGreaterThan(ia.nominal!);
    expect(ia.stats!.histogram.reduce((n, b) => n + b.count, 0)).toBe(500);
    // the sensitivity ranking puts the mains first for the plate current (±10 % on B+ against 1 % resistors)
    expect(s.sensitivity.find((x) => x.metric === 'plateCurrent')!.ranking[0]!.factor).toBe('mains');
  });

  it('scales the tube emission so the current at a fixed point moves by exactly the drawn factor (Koren 1996 form)', () => {
    const tube = input.tube as Extract<StageInput['tube'], { model: 'koren-triode' }>;
    const scaled = scaleEmission(tube, 1.2) as typeof tube;
    // 12AX7 datasheet typical point: Va 250 V, Vg −2 V (RCA, from memory)
    const a = korenTriodeCurrent(tube, 250, -2);
    const b = korenTriodeCurrent(scaled, 250, -2);
    expect(b / a).toBeCloseTo(1.2, 12);
  });

  it('counts builds outside the bench tolerance', () => {
    const setup = prepareTolerance(input, { trials: 400, seed: 5, benchTolerances: { plateCurrent: 0.001 } });
    const s = summarizeTolerance(setup, [runToleranceTrials(setup, 0, 400)]);
    const ia = s.outsideByBench.find((b) => b.key === 'plateCurrent')!;
    expect(ia.tolerance).toBe(0.001);
    expect(ia.share).toBeGreaterThan(0.9);
    expect(s.outsideBenchShare).toBeGreaterThanOrEqual(ia.share);
  });
});

describe('rank correlation', () => {
  it('the one-ranking-per-column matrix equals pairwise Spearman through mathjs, with failed builds left out', async () => {
    const { spearman, spearmanMatrix, createRng } = await import('@/lib/calc/explore');
    const rng = createRng(9);
    const n = 500;
    const f1 = Float64Array.from({ length: n }, () => rng.uniform());
    const f2 = Float64Array.from({ length: n }, () => rng.normal());
    const r1 = Float64Array.from(f1, (x, i) => x * 3 + 0.2 * (f2[i] as number));
    const r2 = Float64Array.from(f2, (x, i) => (i % 37 === 0 ? NaN : Math.exp(x)));
    const m = spearmanMatrix([f1, f2], [r1, r2]);
    expect(m[0]![0]).toBeCloseTo(spearman(f1, r1), 12);
    expect(m[0]![1]).toBeCloseTo(spearman(f2, r1), 12);
    expect(m[1]![1]).toBeCloseTo(spearman(f2, r2), 12);
    // a monotone function of a factor has ρ = 1 exactly
    expect(m[1]![1]).toBeCloseTo(1, 12);
  });
});

describe('tolerance run of a long-tailed pair', () => {
  it('spreads the splitter balance, led by the two plate resistors', () => {
    const ltp = fixture('ltp-12ax7-bias-tap');
    const setup = prepareTolerance(ltp, { trials: 400, seed: 4, mains: { minus: 0, plus: 0 }, tubeSpread: 0 });
    expect(setup.parts.map((p) => p.path)).toEqual(expect.arrayContaining(['plateResistors.inverting', 'plateResistors.nonInverting', 'tail.tailResistor']));
    const s = summarizeTolerance(setup, [runToleranceTrials(setup, 0, 400)]);
    const balance = s.metrics.find((m) => m.key === 'splitterBalance')!;
    expect(balance.stats!.std).toBeGreaterThan(0.01);
    const top = s.sensitivity.find((x) => x.metric === 'splitterBalance')!.ranking.slice(0, 2).map((r) => r.factor);
    expect(top.sort()).toEqual(['plateResistors.inverting', 'plateResistors.nonInverting']);
  });
});
