/**
 * Small dense Newton helpers shared by the network solvers (no allocation: callers own the scratch arrays).
 */

/**
 * Solves A·x = b in place for n ≤ 8 (row-major n×n in `a`, right side in `b`, solution left in `b`) by Gaussian
 * elimination with partial pivoting. Returns false when a pivot vanishes (the caller falls back).
 */
export function solveDenseInPlace(n: number, a: Float64Array, b: Float64Array): boolean {
  for (let c = 0; c < n; c++) {
    let p = c;
    let best = Math.abs(a[c * n + c] as number);
    for (let r = c + 1; r < n; r++) {
      const v = Math.abs(a[r * n + c] as number);
      if (v > best) {
        best = v;
        p = r;
      }
    }
    if (!(best > 1e-300)) return false;
    if (p !== c) {
      for (let k = 0; k < n; k++) {
        const t = a[c * n + k] as number;
        a[c * n + k] = a[p * n + k] as number;
        a[p * n + k] = t;
      }
      const t = b[c] as number;
      b[c] = b[p] as number;
      b[p] = t;
    }
    const piv = a[c * n + c] as number;
    for (let r = c + 1; r < n; r++) {
      const f = (a[r * n + c] as number) / piv;
      if (f === 0) continue;
      for (let k = c; k < n; k++) a[r * n + k] = (a[r * n + k] as number) - f * (a[c * n + k] as number);
      b[r] = (b[r] as number) - f * (b[c] as number);
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r] as number;
    for (let k = r + 1; k < n; k++) s -= (a[r * n + k] as number) * (b[k] as number);
    b[r] = s / (a[r * n + r] as number);
  }
  for (let r = 0; r < n; r++) if (!Number.isFinite(b[r] as number)) return false;
  return true;
}
