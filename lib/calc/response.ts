// Plain re/im arithmetic: the response is 200 points × a handful of factors, and mathjs Complex objects
// cost allocation and dispatch per operation that would dominate the 2 ms budget.
export type Cx = { re: number; im: number };

export const cx = (re: number, im = 0): Cx => ({ re, im });
export const cmul = (a: Cx, b: Cx): Cx => ({ re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re });
export const cdiv = (a: Cx, b: Cx): Cx => {
  const d = b.re * b.re + b.im * b.im;
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d };
};
export const cadd = (a: Cx, b: Cx): Cx => ({ re: a.re + b.re, im: a.im + b.im });
export const cabs = (a: Cx): number => Math.hypot(a.re, a.im);

/** Gain as a bilinear (Möbius) function of one node impedance Z: A(Z) = (a + bZ)/(1 + dZ), fitted from 3 points. */
export type Bilinear = { a: number; b: number; d: number };

export function fitBilinear(z1: number, a0: number, a1: number, z2: number, a2: number): Bilinear {
  // b·z − A·z·d = A − a0 for the two non-zero points
  const m11 = z1;
  const m12 = -a1 * z1;
  const m21 = z2;
  const m22 = -a2 * z2;
  const r1 = a1 - a0;
  const r2 = a2 - a0;
  const det = m11 * m22 - m12 * m21;
  if (Math.abs(det) < 1e-300) return { a: a0, b: 0, d: 0 };
  return { a: a0, b: (r1 * m22 - m12 * r2) / det, d: (m11 * r2 - m21 * r1) / det };
}

export function evalBilinear(f: Bilinear, z: Cx): Cx {
  return cdiv(cadd(cx(f.a), cmul(cx(f.b), z)), cadd(cx(1), cmul(cx(f.d), z)));
}

/** Impedance of R ∥ C at angular frequency w. */
export function parallelRC(r: number, c: number, w: number): Cx {
  return cdiv(cx(r), cx(1, w * r * c));
}

/**
 * A factor of the stage response, normalised to 1 in the midband. `mul(w, h)` multiplies the complex number
 * (h[0] + j·h[1]) by the factor's value at angular frequency w in place (closed form, no allocation: the curve
 * and the cut-off searches call it thousands of times); `at(w)` returns the value.
 */
export type ResponseFactor = { band: 'low' | 'high'; at: (w: number) => Cx; mul: (w: number, h: Float64Array) => void };

function withAt(band: 'low' | 'high', mul: (w: number, h: Float64Array) => void): ResponseFactor {
  const tmp = new Float64Array(2);
  return {
    band,
    mul,
    at: (w) => {
      tmp[0] = 1;
      tmp[1] = 0;
      mul(w, tmp);
      return cx(tmp[0] as number, tmp[1] as number);
    },
  };
}

/** 1/(1 + jwτ) = (1 − jx)/(1 + x²), x = wτ. */
export function firstOrderLowPass(tau: number): ResponseFactor {
  return withAt('high', (w, h) => {
    const x = w * tau;
    const d = 1 + x * x;
    const re = h[0] as number;
    const im = h[1] as number;
    h[0] = (re + im * x) / d;
    h[1] = (im - re * x) / d;
  });
}

/** jwτ/(1 + jwτ) = (x² + jx)/(1 + x²). */
export function firstOrderHighPass(tau: number): ResponseFactor {
  return withAt('low', (w, h) => {
    const x = w * tau;
    const d = 1 + x * x;
    const re = h[0] as number;
    const im = h[1] as number;
    h[0] = (re * x * x - im * x) / d;
    h[1] = (im * x * x + re * x) / d;
  });
}

/** A bypassed node: gain goes from A(R) at DC to A(0) in the midband; normalised by A(0). */
export function bypassFactor(fit: Bilinear, r: number, c: number): ResponseFactor {
  const mid = fit.a;
  return withAt('low', (w, h) => {
    // Z = r/(1 + jwrc); A(Z) = (a + bZ)/(1 + dZ) = (a(1 + jy) + b·r)/((1 + jy) + d·r), y = wrc
    const y = w * r * c;
    const nr = fit.a + fit.b * r;
    const ni = fit.a * y;
    const dr = 1 + fit.d * r;
    const di = y;
    const dd = (dr * dr + di * di) * mid;
    const fr = (nr * dr + ni * di) / dd;
    const fi = (ni * dr - nr * di) / dd;
    const re = h[0] as number;
    const im = h[1] as number;
    h[0] = re * fr - im * fi;
    h[1] = re * fi + im * fr;
  });
}

const H = new Float64Array(2);

function productInto(factors: ResponseFactor[], w: number, band: 'low' | 'high' | undefined, h: Float64Array): void {
  h[0] = 1;
  h[1] = 0;
  for (let i = 0; i < factors.length; i++) {
    const f = factors[i] as ResponseFactor;
    if (!band || f.band === band) f.mul(w, h);
  }
}

export function productAt(factors: ResponseFactor[], w: number, band?: 'low' | 'high'): Cx {
  productInto(factors, w, band, H);
  return cx(H[0] as number, H[1] as number);
}

/** −3 dB frequency of the low or high factors alone, by bisection on log f; null when there are none. */
export function cutoff(factors: ResponseFactor[], band: 'low' | 'high'): number | null {
  const own = factors.filter((f) => f.band === band);
  if (own.length === 0) return null;
  const target = Math.SQRT1_2;
  const mag = (logf: number) => {
    productInto(own, 2 * Math.PI * 10 ** logf, undefined, H);
    return Math.hypot(H[0] as number, H[1] as number);
  };
  let lo = -6;
  let hi = 12;
  const below = (logf: number) => (band === 'low' ? mag(logf) < target : mag(logf) > target);
  if (band === 'low' ? mag(hi) < target || mag(lo) >= target : mag(lo) < target || mag(hi) >= target) return null;
  for (let k = 0; k < 70; k++) {
    const mid = 0.5 * (lo + hi);
    if (below(mid)) lo = mid;
    else hi = mid;
  }
  return 10 ** (0.5 * (lo + hi));
}

export type ResponsePoint = { frequency: number; magnitudeDb: number; phaseDeg: number };

export function responseCurve(gain: number, factors: ResponseFactor[], points = 200, fmin = 10, fmax = 1e5): ResponsePoint[] {
  const out: ResponsePoint[] = [];
  const step = Math.log10(fmax / fmin) / (points - 1);
  for (let k = 0; k < points; k++) {
    const f = fmin * 10 ** (k * step);
    productInto(factors, 2 * Math.PI * f, undefined, H);
    const re = gain * (H[0] as number);
    const im = gain * (H[1] as number);
    const mag = Math.hypot(re, im);
    out.push({
      frequency: f,
      magnitudeDb: mag > 0 ? 20 * Math.log10(mag) : -300,
      phaseDeg: (Math.atan2(im, re) * 180) / Math.PI,
    });
  }
  return out;
}
