export type KorenTriodeParams = { mu: number; ex: number; kg1: number; kp: number; kvb: number; vct?: number };
export type KorenPentodeParams = {
  mu: number;
  ex: number;
  kg1: number;
  kg2: number;
  kp: number;
  kvb: number;
  vct?: number;
};

/** ln(1 + e^x) without overflow for large x or underflow loss for very negative x. */
export function softplus(x: number): number {
  if (x > 30) return x + Math.log1p(Math.exp(-x));
  if (x < -30) return Math.exp(x);
  return Math.log1p(Math.exp(x));
}

function finiteOrZero(x: number): number {
  return Number.isFinite(x) ? x : 0;
}

/** Koren triode E1 (V); ≥ 0 for va > 0. */
export function korenTriodeE1(p: KorenTriodeParams, va: number, vg: number): number {
  if (!(va > 0)) return 0;
  const x = p.kp * (1 / p.mu + (vg + (p.vct ?? 0)) / Math.sqrt(p.kvb + va * va));
  return finiteOrZero((va / p.kp) * softplus(x));
}

/** Plate current (A), Koren convention Ia = 2·E1^EX/KG1 (the factor 2 is part of the published KG1 values). */
export function korenTriodeCurrent(p: KorenTriodeParams, va: number, vg: number): number {
  const e1 = korenTriodeE1(p, va, vg);
  if (!(e1 > 0)) return 0;
  return finiteOrZero((2 * Math.pow(e1, p.ex)) / p.kg1);
}

export function korenPentodeE1(p: KorenPentodeParams, vg1: number, vg2: number): number {
  if (!(vg2 > 0)) return 0;
  const x = p.kp * (1 / p.mu + (vg1 + (p.vct ?? 0)) / vg2);
  return finiteOrZero((vg2 / p.kp) * softplus(x));
}

/** Pentode / beam tetrode plate current (A): 2·E1^EX/KG1 · atan(Va/KVB), KVB in volts. */
export function korenPentodePlateCurrent(p: KorenPentodeParams, va: number, vg1: number, vg2: number): number {
  if (!(va > 0)) return 0;
  const e1 = korenPentodeE1(p, vg1, vg2);
  if (!(e1 > 0)) return 0;
  return finiteOrZero(((2 * Math.pow(e1, p.ex)) / p.kg1) * Math.atan(va / p.kvb));
}

/** Screen current (A): (Vg1 + Vg2/MU)^EX / KG2, no factor 2; zero when the base is ≤ 0. */
export function korenPentodeScreenCurrent(p: KorenPentodeParams, vg1: number, vg2: number): number {
  const base = vg1 + vg2 / p.mu;
  if (!(base > 0) || !(vg2 > 0)) return 0;
  return finiteOrZero(Math.pow(base, p.ex) / p.kg2);
}

/** Logistic 1/(1 + e^-x), the derivative of softplus. */
export function logistic(x: number): number {
  if (x >= 0) return 1 / (1 + Math.exp(-x));
  const e = Math.exp(x);
  return e / (1 + e);
}

/** softplus(x) into SP[0] and its derivative logistic(x) into SP[1], sharing one exp (same softplus bits). */
const SP = new Float64Array(2);
function softplusAndLogistic(x: number): void {
  if (x > 30 || x < -30) {
    SP[0] = softplus(x);
    SP[1] = logistic(x);
    return;
  }
  const e = Math.exp(x);
  SP[0] = Math.log1p(e);
  SP[1] = e / (1 + e);
}

/*
 * Analytic derivatives for the Newton solvers. Each writes the current and its partial derivatives into `out`
 * and returns the current; the current is computed by the same expressions as the plain functions above, so
 * both give bit-identical values. Outside the conducting region everything is 0.
 */

/** out = [Ia, ∂Ia/∂Va, ∂Ia/∂Vg]. */
export function korenTriodeCurrentD(p: KorenTriodeParams, va: number, vg: number, out: Float64Array): number {
  out[0] = 0;
  out[1] = 0;
  out[2] = 0;
  if (!(va > 0)) return 0;
  const s2 = p.kvb + va * va;
  const s = Math.sqrt(s2);
  const vgc = vg + (p.vct ?? 0);
  const x = p.kp * (1 / p.mu + vgc / s);
  softplusAndLogistic(x);
  const sp = SP[0] as number;
  const e1 = finiteOrZero((va / p.kp) * sp);
  if (!(e1 > 0)) return 0;
  const ia = finiteOrZero((2 * Math.pow(e1, p.ex)) / p.kg1);
  if (!(ia > 0)) return 0;
  const sig = SP[1] as number;
  const dIdE = (p.ex * ia) / e1;
  const dEdvg = (va * sig) / s;
  const dEdva = sp / p.kp - (va * va * sig * vgc) / (s2 * s);
  out[0] = ia;
  out[1] = finiteOrZero(dIdE * dEdva);
  out[2] = finiteOrZero(dIdE * dEdvg);
  return ia;
}

/** out = [Ia, ∂Ia/∂Va, ∂Ia/∂Vg1, ∂Ia/∂Vg2]. */
export function korenPentodePlateCurrentD(p: KorenPentodeParams, va: number, vg1: number, vg2: number, out: Float64Array): number {
  out[0] = 0;
  out[1] = 0;
  out[2] = 0;
  out[3] = 0;
  if (!(va > 0) || !(vg2 > 0)) return 0;
  const vgc = vg1 + (p.vct ?? 0);
  const x = p.kp * (1 / p.mu + vgc / vg2);
  softplusAndLogistic(x);
  const sp = SP[0] as number;
  const e1 = finiteOrZero((vg2 / p.kp) * sp);
  if (!(e1 > 0)) return 0;
  const at = Math.atan(va / p.kvb);
  const base = (2 * Math.pow(e1, p.ex)) / p.kg1;
  const ia = finiteOrZero(base * at);
  if (!(ia > 0)) return 0;
  const sig = SP[1] as number;
  const dIdE = (p.ex * ia) / e1;
  out[0] = ia;
  out[1] = finiteOrZero((base * p.kvb) / (p.kvb * p.kvb + va * va));
  out[2] = finiteOrZero(dIdE * sig);
  out[3] = finiteOrZero(dIdE * (sp / p.kp - (sig * vgc) / vg2));
  return ia;
}

/** out = [Ig2, ∂Ig2/∂Vg1, ∂Ig2/∂Vg2]. */
export function korenPentodeScreenCurrentD(p: KorenPentodeParams, vg1: number, vg2: number, out: Float64Array): number {
  out[0] = 0;
  out[1] = 0;
  out[2] = 0;
  const base = vg1 + vg2 / p.mu;
  if (!(base > 0) || !(vg2 > 0)) return 0;
  const ig2 = finiteOrZero(Math.pow(base, p.ex) / p.kg2);
  if (!(ig2 > 0)) return 0;
  const d = (p.ex * ig2) / base;
  out[0] = ig2;
  out[1] = finiteOrZero(d);
  out[2] = finiteOrZero(d / p.mu);
  return ig2;
}
