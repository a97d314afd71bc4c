import { brent } from '../solve';

/** Helpers shared by the waveform solvers. */

export const SAMPLES_PER_CYCLE = 256;

export function sineDrive(amplitude: number, n = SAMPLES_PER_CYCLE): number[] {
  const out: number[] = [];
  for (let k = 0; k < n; k++) out.push(amplitude * Math.sin((2 * Math.PI * k) / n));
  return out;
}

/** Solves a small dense system A·x = b (Gaussian elimination with partial pivoting); null if singular. */
export function solveLinear(a: number[][], b: number[]): number[] | null {
  const n = b.length;
  const m = a.map((row, i) => [...row, b[i] ?? 0]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r]?.[c] ?? 0) > Math.abs(m[p]?.[c] ?? 0)) p = r;
    const pivotRow = m[p];
    if (!pivotRow || Math.abs(pivotRow[c] ?? 0) < 1e-300) return null;
    [m[c], m[p]] = [pivotRow, m[c] ?? pivotRow];
    const row = m[c] ?? pivotRow;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const target = m[r];
      if (!target) continue;
      const f = (target[c] ?? 0) / (row[c] ?? 1);
      for (let k = c; k <= n; k++) target[k] = (target[k] ?? 0) - f * (row[k] ?? 0);
    }
  }
  return m.map((row, i) => (row[n] ?? 0) / (row[i] ?? 1));
}

/**
 * Finds the capacitor-held steady state: cycle means m such that averaging one solved cycle returns m.
 * Newton with a Jacobian from coarse cycles (32 samples: the mean of a smooth periodic waveform converges
 * fast in the sample count), then Broyden updates on full cycles.
 */
export function steadyState<M extends Record<string, number>, R>(
  keys: Array<keyof M>,
  start: M,
  runCycle: (m: M, samples?: number) => { means: M; result: R },
): { means: M; result: R } {
  let m = { ...start };
  let run = runCycle(m);
  if (keys.length === 0) return run;
  const resid = (r: { means: M }, at: M) => keys.map((k) => (r.means[k] as number) - (at[k] as number));
  let g = resid(run, m);
  const scale = keys.map((k) => Math.max(Math.abs(start[k] as number), 1e-9));
  const done = (v: number[]) => v.every((x, i) => Math.abs(x) <= 1e-9 * (scale[i] ?? 1));
  if (done(g)) return run;
  const jac: number[][] = keys.map(() => keys.map(() => 0));
  const coarse = resid(runCycle(m, 32), m);
  keys.forEach((key, j) => {
    const step = 1e-4 * (scale[j] ?? 1);
    const mj = { ...m, [key]: (m[key] as number) + step };
    const gj = resid(runCycle(mj, 32), mj);
    gj.forEach((v, i) => {
      const row = jac[i];
      if (row) row[j] = (v - (coarse[i] ?? 0)) / step;
    });
  });
  for (let iter = 0; iter < 10; iter++) {
    const dx = solveLinear(jac, g.map((v) => -v));
    if (!dx) break;
    const next = { ...m };
    keys.forEach((key, j) => {
      (next[key] as number) = Math.max(0, (m[key] as number) + (dx[j] ?? 0));
    });
    const step = keys.map((k) => (next[k] as number) - (m[k] as number));
    m = next;
    run = runCycle(m);
    const gNew = resid(run, m);
    if (done(gNew)) break;
    // Broyden: J += (Δg − J·Δx)·Δxᵀ / (Δxᵀ·Δx)
    const dg = gNew.map((v, i) => v - (g[i] ?? 0));
    const norm = step.reduce((acc, v) => acc + v * v, 0);
    if (norm > 0) {
      jac.forEach((row, i) => {
        const jdx = row.reduce((acc, v, j) => acc + v * (step[j] ?? 0), 0);
        const u = ((dg[i] ?? 0) - jdx) / norm;
        row.forEach((_, j) => {
          row[j] = (row[j] ?? 0) + u * (step[j] ?? 0);
        });
      });
    }
    g = gNew;
  }
  return run;
}

export function mean(xs: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += xs[i] ?? 0;
  return xs.length ? s / xs.length : 0;
}

/**
 * Smallest x in [0, hi] where a continuous g crosses from negative to ≥ 0 (g(0) < 0 expected);
 * 0 if g(0) ≥ 0 already, null if g stays negative up to hi.
 */
export function firstCrossing(g: (x: number) => number, hi: number): number | null {
  if (g(0) >= 0) return 0;
  if (g(hi) < 0) return null;
  return brent(g, 0, hi, 1e-7 * hi);
}
