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
