import { describe, expect, it } from 'vitest';
import {
  CurveFitError,
  PLACEHOLDER_KG2,
  estimateMuFromCurves,
  fitCurves,
  fitKorenPentode,
  fitKorenTriode,
  fittedCurves,
} from '@/lib/calc/fit';
import {
  korenPentodePlateCurrent,
  korenTriodeCurrent,
  type KorenPentodeParams,
  type KorenTriodeParams,
} from '@/lib/calc/models/koren';
import { range, synthesizePentodeCurves, synthesizeTriodeCurves } from '@/lib/curves/synthetic';
import type { CurvePoint } from '@/lib/curves/types';

// Koren 1996 published sets (Glass Audio 8/5; factor-2 convention), as tabulated in the project's tube-model reference.
const KOREN_12AX7: KorenTriodeParams = { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 };
const KOREN_12AU7: KorenTriodeParams = { mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300 };
const KOREN_300B: KorenTriodeParams = { mu: 3.95, ex: 1.4, kg1: 1550, kp: 65, kvb: 300 };
const KOREN_EL34: KorenPentodeParams = { mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 };

const relErr = (got: number, want: number) => Math.abs(got / want - 1);

/** 10 grid curves × 30 plate voltages = 300 points, 1 % Gaussian noise from a fixed seed. */
function triodeSet(params: KorenTriodeParams, vgMin: number, vaMax: number, seed: number): CurvePoint[] {
  return synthesizeTriodeCurves({
    params,
    gridVoltages: Array.from({ length: 10 }, (_, k) => (vgMin * k) / 9),
    plateVoltages: Array.from({ length: 30 }, (_, k) => (vaMax * (k + 1)) / 30),
    noise: { relative: 0.01, seed },
  });
}

/** RMS relative deviation of the fitted model from the noise-free true model over the points the fit used. */
function rmsAgainstTruth(points: CurvePoint[], truth: (p: CurvePoint) => number, fitted: (p: CurvePoint) => number): number {
  const used = points.filter((p) => truth(p) > 0.002 * Math.max(...points.map(truth)) && p.plateVoltage > 0);
  const sq = used.map((p) => (fitted(p) / truth(p) - 1) ** 2);
  return Math.sqrt(sq.reduce((a, b) => a + b, 0) / sq.length) * 100;
}

describe('fitKorenTriode', () => {
  it.each([
    ['12AX7', KOREN_12AX7, -4.5, 400, 11],
    ['12AU7', KOREN_12AU7, -22.5, 400, 12],
    ['300B', KOREN_300B, -90, 450, 13],
  ] as const)('recovers the Koren 1996 %s set from 300 noisy points', (_name, truth, vgMin, vaMax, seed) => {
    const points = triodeSet(truth, vgMin, vaMax, seed);
    expect(points).toHaveLength(300);
    const t0 = performance.now();
    const fit = fitKorenTriode(points);
    const ms = performance.now() - t0;

    // Residual against the noisy data: about the 1 % noise; the brief's acceptance limit is 2 % RMS.
    expect(fit.rmsErrorPercent).toBeLessThan(2);
    expect(fit.rmsErrorPercent).toBeGreaterThan(0.5); // it cannot beat the noise it was given
    expect(fit.maxErrorPercent).toBeLessThan(6);
    // Against the noise-free model the fitted curves should sit well inside the noise.
    const p = fit.parameters;
    expect(
      rmsAgainstTruth(points, (q) => korenTriodeCurrent(truth, q.plateVoltage, q.gridVoltage), (q) => korenTriodeCurrent(p, q.plateVoltage, q.gridVoltage)),
    ).toBeLessThan(0.5);
    // Identifiable parameters (common practice: MU, EX and KG1 set the bulk of the curves).
    expect(relErr(p.mu, truth.mu)).toBeLessThan(0.02);
    expect(relErr(p.ex, truth.ex)).toBeLessThan(0.02);
    expect(relErr(p.kg1, truth.kg1)).toBeLessThan(0.05);
    // KP only shapes the region near cutoff and KVB only low Va (reference §2.1), so they are looser.
    expect(relErr(p.kp, truth.kp)).toBeLessThan(0.1);
    expect(p.kvb).toBeGreaterThan(truth.kvb / 2);
    expect(p.kvb).toBeLessThan(truth.kvb * 2);

    expect(fit.model).toBe('koren-triode');
    expect(fit.pointCount + fit.skippedCount).toBe(300);
    expect(fit.starts).toBeGreaterThanOrEqual(2);
    expect(fit.iterations).toBeGreaterThan(0);
    expect(ms).toBeLessThan(1000);
  });

  it('fits curves from a different triode law at least as well as the published set does', () => {
    // Dempwolf–Zölzer 12AX7 (DAFx-11, parameters as in reference §2.3), cathode current only: not a Koren curve,
    // so this checks that the optimiser makes real progress from its starts instead of returning one of them.
    const dz = (va: number, vg: number) => 2.242e-3 * Math.pow(Math.log1p(Math.exp(3.4 * (va / 103.2 + vg))) / 3.4, 1.26);
    const points: CurvePoint[] = [];
    for (let vg = 0; vg >= -4; vg -= 0.5) {
      for (let va = 10; va <= 400; va += 15) points.push({ gridVoltage: vg, plateVoltage: va, plateCurrent: dz(va, vg) });
    }
    const fit = fitKorenTriode(points);
    const maxIa = Math.max(...points.map((q) => q.plateCurrent));
    const used = points.filter((q) => q.plateCurrent >= 0.002 * maxIa);
    const rms = (p: KorenTriodeParams) =>
      Math.sqrt(used.reduce((a, q) => a + (korenTriodeCurrent(p, q.plateVoltage, q.gridVoltage) / q.plateCurrent - 1) ** 2, 0) / used.length) * 100;
    expect(fit.pointCount).toBe(used.length);
    expect(fit.rmsErrorPercent).toBeCloseTo(rms(fit.parameters), 9);
    expect(fit.rmsErrorPercent).toBeLessThan(rms(KOREN_12AX7) / 2);
    expect(fit.rmsErrorPercent).toBeLessThan(25);
  });

  it('leaves out points at Va ≤ 0 and below the current floor', () => {
    const points = triodeSet(KOREN_12AX7, -4.5, 400, 21);
    const junk: CurvePoint[] = [
      { gridVoltage: -1, plateVoltage: 0, plateCurrent: 0 },
      { gridVoltage: -2, plateVoltage: 0, plateCurrent: 5e-4 }, // nonsense current at Va = 0 would wreck a fit
      { gridVoltage: -3, plateVoltage: 150, plateCurrent: 1e-9 },
    ];
    const plain = fitKorenTriode(points);
    const withJunk = fitKorenTriode([...points, ...junk]);
    expect(withJunk.skippedCount).toBe(plain.skippedCount + 3);
    expect(withJunk.pointCount).toBe(plain.pointCount);
    expect(withJunk.parameters.mu).toBeCloseTo(plain.parameters.mu, 6);
  });

  it('is deterministic, reports progress between starts and times itself only through opts.now', () => {
    const points = triodeSet(KOREN_12AU7, -22.5, 400, 5);
    const fractions: number[] = [];
    let tick = 0;
    const a = fitKorenTriode(points, { onProgress: (f) => fractions.push(f), now: () => (tick += 7) });
    const b = fitKorenTriode(points);
    expect(a.parameters).toEqual(b.parameters);
    expect(a.elapsedMs).toBe(7);
    expect(b.elapsedMs).toBeUndefined();
    expect(fractions.length).toBe(a.starts + 2);
    expect(fractions.at(-1)).toBe(1);
    expect([...fractions].sort((x, y) => x - y)).toEqual(fractions);
  });

  it('refuses a set with too few usable points', () => {
    const points = triodeSet(KOREN_12AX7, -4.5, 400, 3).slice(0, 8);
    expect(() => fitKorenTriode(points)).toThrow(CurveFitError);
  });
});

describe('fitKorenPentode', () => {
  const grid = range(-30, 0, 5);
  const plate = Array.from({ length: 25 }, (_, k) => 20 * (k + 1));

  it('recovers the Koren 1996 EL34 set, KG2 from screen current', () => {
    const points = synthesizePentodeCurves({
      params: KOREN_EL34,
      gridVoltages: grid,
      plateVoltages: plate,
      screenVoltages: [250, 300],
      noise: { relative: 0.01, seed: 31 },
    });
    const t0 = performance.now();
    const fit = fitKorenPentode(points);
    expect(performance.now() - t0).toBeLessThan(1500);
    const p = fit.parameters;
    expect(fit.rmsErrorPercent).toBeLessThan(2);
    expect(fit.screen?.rmsErrorPercent).toBeLessThan(2);
    expect(fit.kg2Fitted).toBe(true);
    expect(relErr(p.mu, KOREN_EL34.mu)).toBeLessThan(0.05);
    expect(relErr(p.ex, KOREN_EL34.ex)).toBeLessThan(0.05);
    expect(relErr(p.kg1, KOREN_EL34.kg1)).toBeLessThan(0.1);
    expect(relErr(p.kvb, KOREN_EL34.kvb)).toBeLessThan(0.05); // the plate knee is well sampled
    expect(relErr(p.kp, KOREN_EL34.kp)).toBeLessThan(0.1);
    expect(relErr(p.kg2, KOREN_EL34.kg2)).toBeLessThan(0.05);
    expect(
      rmsAgainstTruth(
        points,
        (q) => korenPentodePlateCurrent(KOREN_EL34, q.plateVoltage, q.gridVoltage, q.screenVoltage ?? 0),
        (q) => korenPentodePlateCurrent(p, q.plateVoltage, q.gridVoltage, q.screenVoltage ?? 0),
      ),
    ).toBeLessThan(0.6);
    expect(fit.notes).toEqual([]);
  });

  it('leaves KG2 at the placeholder and says so when there is no screen current', () => {
    const points = synthesizePentodeCurves({
      params: KOREN_EL34,
      gridVoltages: grid,
      plateVoltages: plate,
      screenVoltages: [250],
      noise: { relative: 0.01, seed: 32 },
      withScreenCurrent: false,
    });
    const fit = fitCurves('koren-pentode', points);
    expect(fit.model).toBe('koren-pentode');
    if (fit.model !== 'koren-pentode') return;
    expect(fit.parameters.kg2).toBe(PLACEHOLDER_KG2);
    expect(fit.kg2Fitted).toBe(false);
    expect(fit.screen).toBeUndefined();
    expect(fit.notes.join(' ')).toMatch(/placeholder 4500/);
    expect(fit.notes.join(' ')).toMatch(/one screen voltage/);
    expect(fit.rmsErrorPercent).toBeLessThan(2);
  });

  it('needs a screen voltage on every point', () => {
    const points = triodeSet(KOREN_12AX7, -4.5, 400, 3);
    expect(() => fitKorenPentode(points)).toThrow(/screen voltage/);
  });
});

describe('estimateMuFromCurves', () => {
  it('reads µ from the Va shift between grid curves', () => {
    const noiseless = synthesizeTriodeCurves({ params: KOREN_12AU7, gridVoltages: range(-20, 0, 4), plateVoltages: range(0, 400, 10) });
    const mu = estimateMuFromCurves(noiseless);
    // Local µ differs from the asymptotic MU (reference §2.1), so only the neighbourhood is checked.
    expect(mu).not.toBeNull();
    expect(relErr(mu ?? 0, KOREN_12AU7.mu)).toBeLessThan(0.2);
  });

  it('returns null for a single grid curve', () => {
    const one = synthesizeTriodeCurves({ params: KOREN_12AU7, gridVoltages: [-4], plateVoltages: range(0, 400, 10) });
    expect(estimateMuFromCurves(one)).toBeNull();
  });
});

describe('fittedCurves', () => {
  it('draws one model curve per grid voltage from 0 to vaMax', () => {
    const curves = fittedCurves('koren-triode', KOREN_12AX7, [0, -1, -2], 400, { samples: 41 });
    expect(curves.map((c) => c.gridVoltage)).toEqual([0, -1, -2]);
    for (const c of curves) {
      expect(c.points).toHaveLength(41);
      expect(c.points[0]).toEqual({ plateVoltage: 0, plateCurrent: 0 });
      expect(c.points.at(-1)?.plateVoltage).toBe(400);
    }
    // Reference check value [C]: Koren 12AX7 at 250 V / −2 V is 0.952 mA with the factor 2.
    const at250 = curves[2]?.points[25];
    expect(at250?.plateVoltage).toBe(250);
    expect((at250?.plateCurrent ?? 0) * 1e3).toBeCloseTo(0.952, 3);
  });

  it('draws pentode curves at the given screen voltage and insists on one', () => {
    const curves = fittedCurves('koren-pentode', KOREN_EL34, [-10], 500, { screenVoltage: 250, samples: 11 });
    expect(curves[0]?.points[5]?.plateCurrent).toBeCloseTo(korenPentodePlateCurrent(KOREN_EL34, 250, -10, 250), 12);
    expect(() => fittedCurves('koren-pentode', KOREN_EL34, [-10], 500)).toThrow(/screenVoltage/);
  });
});

describe('large curve sets', () => {
  it('thins a large set for the solver, says so, and still reports errors over every point', () => {
    const points = synthesizeTriodeCurves({
      params: KOREN_12AX7,
      gridVoltages: range(-4.5, 0, 0.25),
      plateVoltages: range(1, 400, 1),
      noise: { relative: 0.01, seed: 77 },
    });
    expect(points.length).toBeGreaterThan(7000);
    const t0 = performance.now();
    const fit = fitKorenTriode(points, { maxFitPoints: 1000 });
    expect(performance.now() - t0).toBeLessThan(3000);
    expect(fit.pointCount + fit.skippedCount).toBe(points.length);
    expect(fit.notes.join(' ')).toMatch(/Fitted on 1000 of \d+ points/);
    expect(fit.rmsErrorPercent).toBeLessThan(2);
    expect(relErr(fit.parameters.mu, KOREN_12AX7.mu)).toBeLessThan(0.02);
  });
});

describe('parameter bounds', () => {
  it('says when a parameter ends on its bound', () => {
    // µ = 2000 lies beyond the triode bound of 500, so the fit has to stop there and must say so.
    const points = synthesizeTriodeCurves({
      params: { mu: 2000, ex: 1.4, kg1: 1060, kp: 12000, kvb: 300 },
      gridVoltages: range(-0.3, 0, 0.05),
      plateVoltages: range(20, 400, 20),
      noise: { relative: 0.01, seed: 4 },
    });
    const fit = fitKorenTriode(points);
    expect(fit.parameters.mu).toBeCloseTo(500, 6);
    expect(fit.notes.join(' ')).toMatch(/MU ended at its upper bound \(500\)/);
  });
});
