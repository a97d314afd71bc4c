// Seeded random numbers for exploration runs (pure-rand's xoroshiro128+). Every trial draws from its own
// generator, seeded from the run seed and the trial index, so a run gives the same builds however its trials are
// split across worker threads or machines.
import { uniformFloat64 } from 'pure-rand/distribution/uniformFloat64';
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';

export type Distribution = 'normal' | 'uniform';

export type Rng = { uniform(): number; normal(): number };

/** 32-bit mix of the run seed and a stream index (murmur3 finaliser), so neighbouring trials are unrelated. */
export function mixSeed(seed: number, stream: number): number {
  let h = Math.imul(seed | 0, 0x9e3779b1) ^ Math.imul((stream + 1) | 0, 0x85ebca6b);
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h | 0;
}

export function createRng(seed: number, stream = 0): Rng {
  const gen = xoroshiro128plus(mixSeed(seed, stream));
  let spare: number | null = null;
  const uniform = () => uniformFloat64(gen);
  return {
    uniform,
    normal() {
      if (spare !== null) {
        const s = spare;
        spare = null;
        return s;
      }
      // Box–Muller; 1 − u keeps the logarithm finite
      const u = 1 - uniform();
      const v = uniform();
      const r = Math.sqrt(-2 * Math.log(u));
      spare = r * Math.sin(2 * Math.PI * v);
      return r * Math.cos(2 * Math.PI * v);
    },
  };
}

/**
 * A multiplicative factor within a tolerance band [1 − minus, 1 + plus] (fractions).
 * `uniform`: flat across the band. `normal`: the band is ±3σ on each side (a split normal for an asymmetric band),
 * truncated at the band's edges — the usual reading of a part's tolerance as its production spread.
 */
export function drawFactor(rng: Rng, minus: number, plus: number, distribution: Distribution): number {
  if (minus === 0 && plus === 0) return 1;
  if (distribution === 'uniform') return 1 - minus + rng.uniform() * (minus + plus);
  for (let i = 0; i < 16; i++) {
    const z = rng.normal();
    if (Math.abs(z) <= 3) return 1 + (z < 0 ? (z / 3) * minus : (z / 3) * plus);
  }
  return 1;
}
