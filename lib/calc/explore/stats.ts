// Distribution statistics through mathjs: percentiles, mean and spread, histograms, rank correlation.
import { corr, mean, quantileSeq, std } from 'mathjs';

export const PERCENTILES = [0.01, 0.05, 0.5, 0.95, 0.99] as const;

export type DistributionStats = {
  count: number;
  mean: number;
  std: number;
  min: number;
  max: number;
  /** p1, p5, p50, p95, p99 */
  percentiles: { p: number; value: number }[];
  histogram: { from: number; to: number; count: number }[];
};

export function finiteValues(values: ArrayLike<number>): number[] {
  const out: number[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number;
    if (Number.isFinite(v)) out.push(v);
  }
  return out;
}

export function describe(values: ArrayLike<number>, bins = 30): DistributionStats | null {
  const xs = finiteValues(values);
  if (xs.length === 0) return null;
  let min = Infinity;
  let max = -Infinity;
  for (const x of xs) {
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const q = quantileSeq(xs, [...PERCENTILES]) as number[];
  const span = max - min;
  const n = span > 0 ? bins : 1;
  const counts = new Array<number>(n).fill(0);
  for (const x of xs) {
    const k = span > 0 ? Math.min(n - 1, Math.floor(((x - min) / span) * n)) : 0;
    counts[k] = (counts[k] ?? 0) + 1;
  }
  return {
    count: xs.length,
    mean: Number(mean(xs)),
    std: xs.length > 1 ? Number(std(xs)) : 0,
    min,
    max,
    percentiles: PERCENTILES.map((p, i) => ({ p, value: q[i] as number })),
    histogram: counts.map((count, k) => ({ from: min + (span * k) / n, to: min + (span * (k + 1)) / n, count })),
  };
}

/** Ranks (1-based, ties averaged). */
export function ranks(xs: number[]): number[] {
  const idx = xs.map((_, i) => i).sort((a, b) => (xs[a] as number) - (xs[b] as number));
  const r = new Array<number>(xs.length);
  for (let i = 0; i < idx.length; ) {
    let j = i;
    while (j + 1 < idx.length && xs[idx[j + 1] as number] === xs[idx[i] as number]) j++;
    const avg = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) r[idx[k] as number] = avg;
    i = j + 1;
  }
  return r;
}

/** Spearman's rank correlation of paired samples (pairs with a non-finite member are dropped); 0 when either is constant. */
export function spearman(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const xa: number[] = [];
  const xb: number[] = [];
  for (let i = 0; i < a.length; i++) {
    const u = a[i] as number;
    const v = b[i] as number;
    if (Number.isFinite(u) && Number.isFinite(v)) {
      xa.push(u);
      xb.push(v);
    }
  }
  if (xa.length < 3) return 0;
  const ra = ranks(xa);
  const rb = ranks(xb);
  const c = Number(corr(ra, rb));
  return Number.isFinite(c) ? c : 0;
}

/** Pearson correlation of two equal-length arrays; 0 when either is constant. */
export function pearson(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const n = a.length;
  if (n < 3) return 0;
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i] as number;
    mb += b[i] as number;
  }
  ma /= n;
  mb /= n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    const x = (a[i] as number) - ma;
    const y = (b[i] as number) - mb;
    sab += x * y;
    saa += x * x;
    sbb += y * y;
  }
  const c = sab / Math.sqrt(saa * sbb);
  return Number.isFinite(c) ? c : 0;
}

/**
 * Spearman's ρ of every factor column against every result column, ranking each column once. Rows where a result
 * is not finite (a build that could not be analysed) are left out of that result's correlations.
 */
export function spearmanMatrix(factors: ArrayLike<number>[], results: ArrayLike<number>[]): number[][] {
  const n = factors[0]?.length ?? 0;
  const factorRanks = factors.map((f) => ranks(Array.from(f)));
  return results.map((r) => {
    const keep: number[] = [];
    for (let i = 0; i < n; i++) if (Number.isFinite(r[i] as number)) keep.push(i);
    if (keep.length < 3) return factors.map(() => 0);
    const rr = ranks(keep.map((i) => r[i] as number));
    if (keep.length === n) return factorRanks.map((fr) => pearson(fr, rr));
    return factors.map((f) => pearson(ranks(keep.map((i) => f[i] as number)), rr));
  });
}
