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

/** Dense k×k solve for the (1–3 key) cycle-mean systems, on plain arrays; null if singular. */
function newtonStep(jac: number[][], g: number[]): number[] | null {
  return solveLinear(jac, g.map((v) => -v));
}

/** Broyden update J += (Δg − J·Δx)·Δxᵀ / (Δxᵀ·Δx). */
function broyden(jac: number[][], dx: number[], dg: number[]): void {
  const norm = dx.reduce((acc, v) => acc + v * v, 0);
  if (!(norm > 0)) return;
  jac.forEach((row, i) => {
    const jdx = row.reduce((acc, v, j) => acc + v * (dx[j] ?? 0), 0);
    const u = ((dg[i] ?? 0) - jdx) / norm;
    row.forEach((_, j) => {
      row[j] = (row[j] ?? 0) + u * (dx[j] ?? 0);
    });
  });
}

const COARSE = 32;

/**
 * Finds the capacitor-held steady state: cycle means m such that averaging one solved cycle returns m
 * (converged when every residual is within 1e-9 of its scale).
 *
 * The iteration first converges on coarse cycles (an eighth of the samples; Newton with a finite-difference
 * Jacobian, then Broyden): the mean of a smooth periodic waveform converges fast in the sample count, so the
 * coarse fixed point is within ~1e-4 of the full one. Newton–Broyden on full cycles then starts from there
 * with the coarse Jacobian: typically three full cycles in all, the last one confirming convergence.
 */
export function steadyState<M extends Record<string, number>, R>(
  keys: Array<keyof M>,
  start: M,
  runCycle: (m: M, samples?: number) => { means: M; result: R },
  /** where the iteration starts, when a better guess than `start` (the idle means, which set the scale) is known */
  from?: M,
  /** samples per coarse cycle (an eighth of the full 256 by default) */
  coarse = COARSE,
): { means: M; result: R } {
  if (keys.length === 0) return runCycle({ ...start });
  let m = { ...start };
  const resid = (r: { means: M }, at: M) => keys.map((k) => (r.means[k] as number) - (at[k] as number));
  const scale = keys.map((k) => Math.max(Math.abs(start[k] as number), 1e-9));
  if (from) m = { ...from };
  const within = (v: number[], tol: number) => v.every((x, i) => Math.abs(x) <= tol * (scale[i] ?? 1));
  const done = (v: number[]) => within(v, 1e-9);
  const coarseAt = (at: M) => resid(runCycle(at, coarse), at);
  const apply = (at: M, dx: number[]) => {
    const next = { ...at };
    keys.forEach((key, j) => {
      (next[key] as number) = Math.max(0, (at[key] as number) + (dx[j] ?? 0));
    });
    return next;
  };
  const diff = (a: M, b: M) => keys.map((k) => (a[k] as number) - (b[k] as number));

  // Jacobian of the coarse residual at the start (forward differences)
  const jac: number[][] = keys.map(() => keys.map(() => 0));
  let gc = coarseAt(m);
  keys.forEach((key, j) => {
    const step = 1e-4 * (scale[j] ?? 1);
    const mj = { ...m, [key]: (m[key] as number) + step };
    const gj = coarseAt(mj);
    gj.forEach((v, i) => {
      const row = jac[i];
      if (row) row[j] = (v - (gc[i] ?? 0)) / step;
    });
  });

  // converge the coarse problem (Newton–Broyden, tight tolerance: coarse cycles are cheap)
  for (let iter = 0; iter < 12; iter++) {
    if (within(gc, 1e-12)) break;
    const dx = newtonStep(jac, gc);
    if (!dx) break;
    const next = apply(m, dx);
    const gNew = coarseAt(next);
    broyden(jac, diff(next, m), gNew.map((v, i) => v - (gc[i] ?? 0)));
    m = next;
    gc = gNew;
  }
  let run = runCycle(m);
  let g = resid(run, m);
  // then Newton–Broyden on full cycles from there (the coarse Jacobian is already close)
  for (let iter = 0; iter < 10 && !done(g); iter++) {
    const dx = newtonStep(jac, g);
    if (!dx) break;
    const next = apply(m, dx);
    const step = diff(next, m);
    m = next;
    run = runCycle(m);
    const gNew = resid(run, m);
    broyden(jac, step, gNew.map((v, i) => v - (g[i] ?? 0)));
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
 * 0 if g(0) ≥ 0 already, null if g stays negative up to hi. With `start` (the scale where a crossing is
 * expected) it first walks out from 0 by doubling, so every evaluation is near the last one (the solvers warm
 * start from it) and no evaluation goes far beyond the crossing; Brent then refines inside the last doubling.
 * The tolerance is 1e-7·hi either way.
 */
export function firstCrossing(g: (x: number) => number, hi: number, start?: number, tol = 1e-7 * hi): number | null {
  if (g(0) >= 0) return 0;
  if (start === undefined || !(start > 0)) {
    if (g(hi) < 0) return null;
    return brent(g, 0, hi, tol);
  }
  let lo = 0;
  let a = Math.min(start, hi);
  for (;;) {
    if (g(a) >= 0) break;
    if (a >= hi) return null;
    lo = a;
    a = Math.min(2 * a, hi);
  }
  return brent(g, lo, a, tol);
}

/**
 * The nearest of several drive limits: each criterion g(a) (negative below its limit) is searched only up to the
 * nearest limit found so far, since a farther one cannot win. Same tolerance as a search over [0, limit].
 */
export function nearestLimit<L extends string>(
  criteria: Array<[L, (a: number) => number]>,
  limit: number,
  scale: number,
): [L | 'none', number] {
  let best: [L | 'none', number] = ['none', limit];
  const tol = 1e-7 * limit;
  for (const [name, g] of criteria) {
    const value = firstCrossing(g, best[1], scale, tol);
    if (value !== null && value < best[1]) best = [name, value];
  }
  return best;
}
