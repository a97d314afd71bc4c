/** Planar-diode constant (4ε0/9)·sqrt(2e/m) in A·V^-3/2 (ref §1, recomputed). */
export const CHILD_LANGMUIR_PLANAR = 2.334e-6;

/** Perveance of a planar diode with electrode area (m²) and spacing (m). */
export function planarPerveance(area: number, spacing: number): number {
  return (CHILD_LANGMUIR_PLANAR * area) / (spacing * spacing);
}

/** Space-charge-limited diode current I = K·V^1.5 (0 for V ≤ 0). */
export function childLangmuirDiodeCurrent(perveance: number, v: number): number {
  return v > 0 ? perveance * v * Math.sqrt(v) : 0;
}

export type ThreeHalvesTriodeParams = { perveance: number; mu: number };

/** Equivalent-diode triode Ia = K·(Vg + Va/µ)^1.5, zero below cutoff and for Va ≤ 0. */
export function threeHalvesTriodeCurrent(p: ThreeHalvesTriodeParams, va: number, vg: number): number {
  if (!(va > 0)) return 0;
  const e = vg + va / p.mu;
  return e > 0 ? p.perveance * e * Math.sqrt(e) : 0;
}

/** out = [Ia, ∂Ia/∂Va, ∂Ia/∂Vg] of the 3/2-power triode. */
export function threeHalvesTriodeCurrentD(p: ThreeHalvesTriodeParams, va: number, vg: number, out: Float64Array): number {
  out[0] = 0;
  out[1] = 0;
  out[2] = 0;
  if (!(va > 0)) return 0;
  const e = vg + va / p.mu;
  if (!(e > 0)) return 0;
  const r = Math.sqrt(e);
  const ia = p.perveance * e * r;
  out[0] = ia;
  out[2] = 1.5 * p.perveance * r;
  out[1] = out[2] / p.mu;
  return ia;
}
