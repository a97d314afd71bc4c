/**
 * Positive-grid current as in Koren's subcircuits: a diode (IS = 1 nA, N = 1, RS = 1 Ω) in series with RGI from
 * grid to cathode, so Ig ≈ Vgk/RGI once it conducts. The diode junction capacitance of the published
 * subcircuit is left out; grid capacitances come from the tube's `capacitances`.
 */
export const GRID_DIODE_IS = 1e-9;
export const GRID_DIODE_RS = 1;
/** kT/q at ngspice's default 27 °C. */
export const THERMAL_VOLTAGE = 0.025864186;

export function gridCurrent(vgk: number, rgi: number): number {
  const r = rgi + GRID_DIODE_RS;
  if (!(vgk > 0)) return 0;
  // Solve vgk = VT·ln(1 + i/IS) + i·r, monotone in i, bracketed by [0, vgk/r].
  let lo = 0;
  let hi = vgk / r;
  let i = Math.max(0, (vgk - THERMAL_VOLTAGE * Math.log1p(hi / GRID_DIODE_IS)) / r);
  for (let k = 0; k < 60; k++) {
    const g = THERMAL_VOLTAGE * Math.log1p(i / GRID_DIODE_IS) + i * r - vgk;
    if (g > 0) hi = i;
    else lo = i;
    const dg = THERMAL_VOLTAGE / (GRID_DIODE_IS + i) + r;
    let next = i - g / dg;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - i) <= 1e-15 + 1e-12 * i) return next;
    i = next;
  }
  return i;
}

/** out = [Ig, dIg/dVgk]; the slope of the diode + resistance is 1/(VT/(IS + i) + r). */
export function gridCurrentD(vgk: number, rgi: number, out: Float64Array): number {
  const i = gridCurrent(vgk, rgi);
  out[0] = i;
  out[1] = vgk > 0 ? 1 / (THERMAL_VOLTAGE / (GRID_DIODE_IS + i) + rgi + GRID_DIODE_RS) : 0;
  return i;
}
