/**
 * Brent's method on a bracket [a, b] with f(a)·f(b) ≤ 0. Returns the root to within `tol` (absolute).
 * Never returns NaN: a degenerate bracket returns its midpoint.
 */
export function brent(f: (x: number) => number, a: number, b: number, tol = 1e-13, maxIter = 100): number {
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (fa * fb > 0 || !Number.isFinite(fa) || !Number.isFinite(fb)) return Math.abs(fa) < Math.abs(fb) ? a : b;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 0; iter < maxIter; iter++) {
    if (fb * fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * xm * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      p = Math.abs(p);
      if (2 * p < Math.min(3 * xm * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : xm > 0 ? tol1 : -tol1;
    fb = f(b);
  }
  return b;
}

/**
 * Root of a non-decreasing f on [lo, hi] (f(lo) ≤ 0 ≤ f(hi) assumed). With a guess it runs a secant
 * iteration kept inside the shrinking bracket (2–4 evaluations when the guess comes from the previous
 * waveform sample); if a step leaves the bracket it falls back to Brent on the bracket found so far.
 */
export function solveIncreasing(
  f: (x: number) => number,
  lo: number,
  hi: number,
  guess?: number,
  tol = 1e-13,
): number {
  if (!(hi > lo)) return lo;
  if (guess === undefined || !(guess >= lo && guess <= hi)) return brent(f, lo, hi, tol);
  let a = lo;
  let b = hi;
  let x0 = guess;
  let f0 = f(x0);
  if (f0 === 0) return x0;
  if (f0 < 0) a = x0;
  else b = x0;
  const step = Math.max(Math.abs(x0) * 1e-7, tol * 10);
  let x1 = f0 < 0 ? Math.min(x0 + step, hi) : Math.max(x0 - step, lo);
  for (let iter = 0; iter < 30; iter++) {
    const f1 = f(x1);
    if (f1 === 0) return x1;
    if (f1 < 0) a = Math.max(a, x1);
    else b = Math.min(b, x1);
    const denom = f1 - f0;
    let x2 = denom !== 0 ? x1 - (f1 * (x1 - x0)) / denom : Number.NaN;
    if (!(x2 > a && x2 < b)) {
      if (b - a <= tol) return 0.5 * (a + b);
      return brent(f, a, b, tol);
    }
    if (Math.abs(x2 - x1) <= tol) return x2;
    x0 = x1;
    f0 = f1;
    x1 = x2;
  }
  return brent(f, a, b, tol);
}

/** Expands hi (doubling) until f(hi) ≥ 0 for a non-decreasing f; returns null if none is found. */
export function expandUpper(f: (x: number) => number, start: number, limit: number): number | null {
  let hi = start;
  for (let k = 0; k < 80 && hi <= limit; k++) {
    if (f(hi) >= 0) return hi;
    hi *= 2;
  }
  return null;
}
