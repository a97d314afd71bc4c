import { describe, expect, it } from 'vitest';
import {
  childLangmuirDiodeCurrent,
  planarPerveance,
  threeHalvesTriodeCurrent,
} from '@/lib/calc/models/child-langmuir';
import { gridCurrent } from '@/lib/calc/models/grid-current';
import {
  korenPentodePlateCurrent,
  korenPentodeScreenCurrent,
  korenTriodeCurrent,
  softplus,
} from '@/lib/calc/models/koren';
import { tubeDerivatives, tubeModel } from '@/lib/calc/models/registry';

// ref §3.1 / §3.2 (Koren 1996 parameter sets)
const AX7 = { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 };
const AU7 = { mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300 };
const AT7 = { mu: 60, ex: 1.35, kg1: 460, kp: 300, kvb: 300 };
const DJ8 = { mu: 28, ex: 1.3, kg1: 330, kp: 320, kvb: 300 };
const B300 = { mu: 3.95, ex: 1.4, kg1: 1550, kp: 65, kvb: 300 };
const A23 = { mu: 4.2, ex: 1.4, kg1: 1500, kp: 60, kvb: 300 };
const EL34 = { mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 };

describe('Koren triode', () => {
  it('uses the factor-2 convention (ref §2.1 check [C]: 0.952 mA at 250 V / −2 V, 0.476 mA without)', () => {
    const ia = korenTriodeCurrent(AX7, 250, -2);
    expect(ia * 1e3).toBeCloseTo(0.952, 3);
    expect((ia / 2) * 1e3).toBeCloseTo(0.476, 3);
  });

  // ref §4.3 table [C]: model Ia, gm (mA/V), ra (kΩ), local µ at the datasheet points
  it.each([
    ['12AX7', AX7, 250, -2, 0.952e-3, 1.67e-3, 53.7e3, 89.7],
    ['12AX7', AX7, 100, -1, 0.1e-3, 0.59e-3, 141e3, 82.6],
    ['12AU7', AU7, 250, -8.5, 10.39e-3, 2.48e-3, 7.25e3, 18.0],
    ['12AU7', AU7, 100, 0, 12.59e-3, 3.38e-3, 6.11e3, 20.7],
    ['12AT7', AT7, 250, -2, 12.84e-3, 7.22e-3, 7.88e3, 56.9],
    ['6DJ8', DJ8, 90, -1.3, 14.32e-3, 9.43e-3, 2.96e3, 27.9],
    ['300B', B300, 300, -61, 58.4e-3, 5.16e-3, 0.76e3, 3.9],
    ['2A3', A23, 250, -45, 57.7e-3, 5.31e-3, 0.78e3, 4.2],
  ] as const)('%s at %s V / %s V matches the §4.3 table', (_n, p, va, vg, ia, gm, ra, mu) => {
    expect(Math.abs(korenTriodeCurrent(p, va, vg) / ia - 1)).toBeLessThan(0.01);
    const d = tubeDerivatives(tubeModel({ model: 'koren-triode', ...p }), va, vg);
    expect(Math.abs(d.gm / gm - 1)).toBeLessThan(0.015);
    expect(Math.abs(d.ra / ra - 1)).toBeLessThan(0.015);
    expect(Math.abs(d.mu / mu - 1)).toBeLessThan(0.015);
  });

  it('is zero for Va ≤ 0 and deep cutoff, and never NaN or infinite for extreme arguments (common practice)', () => {
    expect(korenTriodeCurrent(AX7, 0, 0)).toBe(0);
    expect(korenTriodeCurrent(AX7, -50, 0)).toBe(0);
    expect(korenTriodeCurrent(AX7, 250, -1e6)).toBe(0);
    for (const [va, vg] of [[1e6, 1e6], [1e-12, 0], [250, 1e300], [Number.MAX_VALUE, 0], [250, -Infinity]]) {
      const ia = korenTriodeCurrent(AX7, va as number, vg as number);
      expect(Number.isFinite(ia)).toBe(true);
      expect(ia).toBeGreaterThanOrEqual(0);
    }
  });

  it('softplus is overflow-safe and accurate (from memory: ln(1+e^x))', () => {
    expect(softplus(1000)).toBe(1000);
    expect(softplus(-1000)).toBe(0);
    expect(softplus(0)).toBeCloseTo(Math.LN2, 15);
    expect(softplus(5)).toBeCloseTo(Math.log(1 + Math.exp(5)), 14);
    expect(softplus(-40)).toBeCloseTo(Math.exp(-40), 30);
  });
});

describe('Koren pentode', () => {
  it('saturates at π·E1^EX/KG1 far above the knee (ref §2.2)', () => {
    const far = korenPentodePlateCurrent(EL34, 1e6, -12, 250);
    const e1 = (250 / EL34.kp) * Math.log1p(Math.exp(EL34.kp * (1 / EL34.mu + -12 / 250)));
    expect(far / ((Math.PI * e1 ** EL34.ex) / EL34.kg1)).toBeCloseTo(1, 4);
  });

  it('screen current follows (Vg1 + Vg2/µ)^EX/KG2 without the factor 2 (ref §2.2)', () => {
    expect(korenPentodeScreenCurrent(EL34, -12, 250)).toBeCloseTo((-12 + 250 / 11) ** 1.35 / 4200, 12);
    expect(korenPentodeScreenCurrent(EL34, -30, 250)).toBe(0);
    expect(korenPentodePlateCurrent(EL34, 0, -12, 250)).toBe(0);
  });
});

describe('Child–Langmuir', () => {
  it('scales as V^1.5 (ref §1)', () => {
    const k = 2e-6;
    expect(childLangmuirDiodeCurrent(k, 400) / childLangmuirDiodeCurrent(k, 100)).toBeCloseTo(8, 12);
    expect(childLangmuirDiodeCurrent(k, 10) / childLangmuirDiodeCurrent(k, 1)).toBeCloseTo(10 ** 1.5, 10);
    expect(childLangmuirDiodeCurrent(k, -5)).toBe(0);
  });

  it('planar perveance is 2.334e-6·A/d² (ref §1 [C])', () => {
    expect(planarPerveance(1e-4, 1e-3)).toBeCloseTo(2.334e-4, 10);
  });

  it('3/2-law triode gives gm = 1.5·K^(2/3)·Ia^(1/3) and ra = µ/gm (ref §1 [C])', () => {
    const p = { perveance: 1e-5, mu: 20 };
    const model = tubeModel({ model: 'child-langmuir', ...p });
    const ia = threeHalvesTriodeCurrent(p, 200, -4);
    const d = tubeDerivatives(model, 200, -4);
    expect(d.gm / (1.5 * p.perveance ** (2 / 3) * ia ** (1 / 3))).toBeCloseTo(1, 6);
    expect(d.ra / (p.mu / d.gm)).toBeCloseTo(1, 6);
    expect(d.mu).toBeCloseTo(20, 4);
  });
});

describe('grid current', () => {
  it('is ≈ Vgk/RGI once conducting and 0 for a negative grid (ref §2.1, Koren subcircuits)', () => {
    expect(gridCurrent(-1, 2000)).toBe(0);
    const i = gridCurrent(10, 2000);
    expect(i).toBeGreaterThan(0.9 * (10 / 2001));
    expect(i).toBeLessThan(10 / 2001);
    expect(gridCurrent(0.3, 2000)).toBeGreaterThan(0);
  });

  it('defaults RGI to 2 kΩ for small triodes and 1 kΩ for power tubes (ref §2.1)', () => {
    expect(tubeModel({ model: 'koren-triode', ...AX7 }).rgi).toBe(2000);
    expect(tubeModel({ model: 'koren-pentode', ...EL34 }).rgi).toBe(1000);
    expect(tubeModel({ model: 'koren-triode', ...B300, ratings: { plateDissipation: 36 } }).rgi).toBe(1000);
  });
});
