import {
  korenPentodePlateCurrent,
  korenPentodeScreenCurrent,
  korenTriodeCurrent,
  type KorenPentodeParams,
  type KorenTriodeParams,
} from '@/lib/calc/models/koren';
import type { CurvePoint } from './types';

/** Small seeded PRNG (mulberry32) so generated curve sets are identical on every run. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates (Box–Muller) from a uniform source. */
export function seededGaussian(seed: number): () => number {
  const uniform = seededRandom(seed);
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u === 0) u = uniform();
    const v = uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

export function range(from: number, to: number, step: number): number[] {
  const n = Math.round((to - from) / step);
  return Array.from({ length: n + 1 }, (_, k) => Number((from + k * step).toFixed(10)));
}

export type SyntheticNoise = {
  /** Relative Gaussian noise, e.g. 0.01 for 1 %. */
  relative: number;
  seed: number;
};

function noisy(value: number, noise: SyntheticNoise | undefined, gauss: (() => number) | null): number {
  if (!noise || !gauss || value === 0) return value;
  return Math.max(0, value * (1 + noise.relative * gauss()));
}

/** Invented "measured" triode curves from a Koren model; not data from any real tube. */
export function synthesizeTriodeCurves(args: {
  params: KorenTriodeParams;
  gridVoltages: readonly number[];
  plateVoltages: readonly number[];
  noise?: SyntheticNoise;
}): CurvePoint[] {
  const gauss = args.noise ? seededGaussian(args.noise.seed) : null;
  const points: CurvePoint[] = [];
  for (const vg of args.gridVoltages) {
    for (const va of args.plateVoltages) {
      points.push({
        gridVoltage: vg,
        plateVoltage: va,
        plateCurrent: noisy(korenTriodeCurrent(args.params, va, vg), args.noise, gauss),
      });
    }
  }
  return points;
}

/** Invented pentode curves (plate and screen current) from a Koren model. */
export function synthesizePentodeCurves(args: {
  params: KorenPentodeParams;
  gridVoltages: readonly number[];
  plateVoltages: readonly number[];
  screenVoltages: readonly number[];
  noise?: SyntheticNoise;
  withScreenCurrent?: boolean;
}): CurvePoint[] {
  const gauss = args.noise ? seededGaussian(args.noise.seed) : null;
  const points: CurvePoint[] = [];
  for (const vg2 of args.screenVoltages) {
    for (const vg of args.gridVoltages) {
      for (const va of args.plateVoltages) {
        const p: CurvePoint = {
          gridVoltage: vg,
          plateVoltage: va,
          screenVoltage: vg2,
          plateCurrent: noisy(korenPentodePlateCurrent(args.params, va, vg, vg2), args.noise, gauss),
        };
        if (args.withScreenCurrent !== false) {
          p.screenCurrent = noisy(korenPentodeScreenCurrent(args.params, vg, vg2), args.noise, gauss);
        }
        points.push(p);
      }
    }
  }
  return points;
}
