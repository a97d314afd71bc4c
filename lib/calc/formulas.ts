/**
 * Closed-form handbook results for linear small-signal stages (ref §5; RDH4 / Terman, re-derived).
 * The engine itself linearises the full nonlinear circuit; these are for cross-checks and quick estimates.
 */
export const parallel = (a: number, b: number) => (a * b) / (a + b);

/** Common cathode, cathode fully bypassed: Av = −µ·RL/(ra + RL). */
export function gainBypassed(mu: number, ra: number, rl: number): number {
  return (-mu * rl) / (ra + rl);
}

/** Common cathode, cathode resistor unbypassed: Av = −µ·RL/(ra + RL + (µ+1)·Rk). */
export function gainUnbypassed(mu: number, ra: number, rl: number, rk: number): number {
  return (-mu * rl) / (ra + rl + (mu + 1) * rk);
}

/** Output impedance at the plate: Ra ∥ (ra + (µ+1)·Rk) (Rk = 0 when bypassed). */
export function plateOutputImpedance(mu: number, ra: number, plateResistor: number, rk = 0): number {
  return parallel(plateResistor, ra + (mu + 1) * rk);
}

/** Cathode follower: Av = µ·Rk/(ra + (µ+1)·Rk), Zout = Rk ∥ (ra + Rp)/(µ+1). */
export function followerGain(mu: number, ra: number, rk: number): number {
  return (mu * rk) / (ra + (mu + 1) * rk);
}
export function followerOutputImpedance(mu: number, ra: number, rk: number, rp = 0): number {
  return parallel(rk, (ra + rp) / (mu + 1));
}

/** Miller input capacitance of a common-cathode stage: Cgk + Cga·(1 + |Av|). */
export function millerCapacitance(cgk: number, cga: number, gain: number): number {
  return cgk + cga * (1 + Math.abs(gain));
}

/** Cathode bypass zero and pole: f_z = 1/(2π·Ck·Rk), f_p = 1/(2π·Ck·Rk'), Rk' = Rk ∥ (ra + RL)/(µ+1). */
export function cathodeBypassCorners(mu: number, ra: number, rl: number, rk: number, ck: number) {
  const rkEff = parallel(rk, (ra + rl) / (mu + 1));
  return { rkEff, zero: 1 / (2 * Math.PI * ck * rk), pole: 1 / (2 * Math.PI * ck * rkEff) };
}

/** Coupling capacitor high-pass: f_L = 1/(2π·Cc·(Zout + Rg_next)). */
export function couplingCutoff(cc: number, zout: number, rgNext: number): number {
  return 1 / (2 * Math.PI * cc * (zout + rgNext));
}
