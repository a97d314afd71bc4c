import FFT from 'fft.js';

const fftCache = new Map<number, { fft: FFT; out: number[] }>();

/**
 * Peak amplitudes of harmonics 0..maxOrder (0 = mean) of one whole cycle sampled uniformly,
 * length a power of two. fft.js objects are cached per size because building the twiddle table
 * dominates the cost for small transforms.
 */
export function harmonicAmplitudes(cycle: ArrayLike<number>, maxOrder = 10): number[] {
  const n = cycle.length;
  let entry = fftCache.get(n);
  if (!entry) {
    const fft = new FFT(n);
    entry = { fft, out: fft.createComplexArray() as number[] };
    fftCache.set(n, entry);
  }
  const input = Array.from(cycle);
  entry.fft.realTransform(entry.out, input);
  const amps: number[] = [];
  for (let k = 0; k <= maxOrder && k < n / 2; k++) {
    const re = entry.out[2 * k] ?? 0;
    const im = entry.out[2 * k + 1] ?? 0;
    amps.push(((k === 0 ? 1 : 2) * Math.hypot(re, im)) / n);
  }
  return amps;
}

/** THD (fraction) from harmonic amplitudes: sqrt(Σ h_n², n = 2..) / h1. */
export function thdFromAmplitudes(amps: number[], maxOrder = 10): number {
  const h1 = amps[1] ?? 0;
  if (!(h1 > 0)) return 0;
  let sum = 0;
  for (let k = 2; k <= maxOrder && k < amps.length; k++) sum += (amps[k] ?? 0) ** 2;
  return Math.sqrt(sum) / h1;
}

/** Three-point (second-harmonic) estimate from the output at the positive peak, rest and negative peak [M: RDH4]. */
export function threePoint(imax: number, io: number, imin: number) {
  const b1 = (imax - imin) / 2;
  const b2 = (imax + imin - 2 * io) / 4;
  return { b1, b2, dcShift: b2, thd: b1 !== 0 ? Math.abs(b2 / b1) : 0 };
}

/** Five-point (Espley) estimate; ix and iy are read at ±half drive. */
export function fivePoint(imax: number, ix: number, io: number, iy: number, imin: number) {
  const b0 = (imax + imin) / 6 + (ix + iy) / 3 - io;
  const b1 = (imax - imin + ix - iy) / 3;
  const b2 = (imax + imin - 2 * io) / 4;
  const b3 = (imax - imin) / 6 - (ix - iy) / 3;
  const b4 = (imax + imin) / 12 - (ix + iy) / 3 + io / 2;
  const thd = b1 !== 0 ? Math.sqrt(b2 * b2 + b3 * b3 + b4 * b4) / Math.abs(b1) : 0;
  return { b0, b1, b2, b3, b4, thd };
}
