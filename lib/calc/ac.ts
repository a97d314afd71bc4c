import type { ResponsePoint } from './response';

/**
 * Small-signal response of a linearised stage solved as one network: complex nodal equations
 * Y(ω)·V = I at each frequency (a dense solve of a handful of nodes, plain re/im arithmetic).
 *
 * Nodes are unknown indices ≥ 0, or the fixed nodes GROUND (0 V) and SOURCE (1 V: the source EMF behind the
 * stage's source resistance), so V at the output node is the transfer from the source EMF.
 *
 * Capacitors carry a band: 'low' for coupling and bypass capacitors (they set the low corner), 'high' for the
 * tube and wiring capacitances. The cut-off searches evaluate each band alone (the other band at its midband
 * limit: low-band capacitors shorted, high-band ones open), as the corner frequencies are defined.
 */
export const GROUND = -1;
export const SOURCE = -2;
export type AcRef = number;

export type AcElement =
  | { kind: 'r'; a: AcRef; b: AcRef; r: number }
  | { kind: 'c'; a: AcRef; b: AcRef; c: number; band: 'low' | 'high' }
  /** current g·(V(cp) − V(cn)) flowing from node `from` through the element into node `to` */
  | { kind: 'g'; from: AcRef; to: AcRef; cp: AcRef; cn: AcRef; g: number };

export type AcNetwork = { n: number; elements: AcElement[] };

export type AcSystem = {
  n: number;
  /** conductances (row-major n×n) and low / high band capacitances */
  g: Float64Array;
  cl: Float64Array;
  ch: Float64Array;
  /** right side from the source node: real conductive part and capacitive parts */
  bg: Float64Array;
  bcl: Float64Array;
  bch: Float64Array;
};

/** Tube stamps: plate current = ga·Vak + gm·Vgk (+ gs·Vg2k), screen current = sg·Vgk + ss·Vg2k. */
export function tubeElements(
  t: { p: AcRef; g: AcRef; k: AcRef; s?: AcRef },
  d: { ga: number; gm: number; gs?: number; sg?: number; ss?: number; gg?: number },
  caps: { cgk: number; cga: number; cak: number },
): AcElement[] {
  const out: AcElement[] = [
    { kind: 'g', from: t.p, to: t.k, cp: t.p, cn: t.k, g: d.ga },
    { kind: 'g', from: t.p, to: t.k, cp: t.g, cn: t.k, g: d.gm },
  ];
  if (t.s !== undefined) {
    if (d.gs) out.push({ kind: 'g', from: t.p, to: t.k, cp: t.s, cn: t.k, g: d.gs });
    if (d.sg) out.push({ kind: 'g', from: t.s, to: t.k, cp: t.g, cn: t.k, g: d.sg });
    if (d.ss) out.push({ kind: 'g', from: t.s, to: t.k, cp: t.s, cn: t.k, g: d.ss });
  }
  if (d.gg) out.push({ kind: 'r', a: t.g, b: t.k, r: 1 / d.gg });
  if (caps.cgk > 0) out.push({ kind: 'c', a: t.g, b: t.k, c: caps.cgk, band: 'high' });
  if (caps.cga > 0) out.push({ kind: 'c', a: t.g, b: t.p, c: caps.cga, band: 'high' });
  if (caps.cak > 0) out.push({ kind: 'c', a: t.p, b: t.k, c: caps.cak, band: 'high' });
  return out;
}

export function compileAc(net: AcNetwork): AcSystem {
  const n = net.n;
  const sys: AcSystem = {
    n,
    g: new Float64Array(n * n),
    cl: new Float64Array(n * n),
    ch: new Float64Array(n * n),
    bg: new Float64Array(n),
    bcl: new Float64Array(n),
    bch: new Float64Array(n),
  };
  // adds y·(V(cp) − V(cn)) to the current leaving `row`
  const stamp = (m: Float64Array, b: Float64Array, row: AcRef, cp: AcRef, cn: AcRef, y: number) => {
    if (row < 0) return;
    // b holds the part of the leaving current due to the 1 V source; Y·V + b = 0
    if (cp >= 0) m[row * n + cp] = (m[row * n + cp] as number) + y;
    else if (cp === SOURCE) b[row] = (b[row] as number) + y;
    if (cn >= 0) m[row * n + cn] = (m[row * n + cn] as number) - y;
    else if (cn === SOURCE) b[row] = (b[row] as number) - y;
  };
  for (const e of net.elements) {
    if (e.kind === 'g') {
      stamp(sys.g, sys.bg, e.from, e.cp, e.cn, e.g);
      stamp(sys.g, sys.bg, e.to, e.cp, e.cn, -e.g);
      continue;
    }
    const [m, b, y] = e.kind === 'r' ? [sys.g, sys.bg, 1 / e.r] : e.band === 'low' ? [sys.cl, sys.bcl, e.c] : [sys.ch, sys.bch, e.c];
    stamp(m, b, e.a, e.a, e.b, y);
    stamp(m, b, e.b, e.b, e.a, y);
  }
  return sys;
}

// scratch for the complex solve (n ≤ 12)
const AR = new Float64Array(144);
const AI = new Float64Array(144);
const BR = new Float64Array(12);
const BI = new Float64Array(12);

/**
 * Solves Y·V = −b at angular frequencies wl (low band) and wh (high band); leaves V in BR/BI and returns
 * false if singular. Y = G + j(wl·Cl + wh·Ch).
 */
function solveAt(s: AcSystem, wl: number, wh: number, inject: number): boolean {
  const n = s.n;
  for (let i = 0; i < n * n; i++) {
    AR[i] = s.g[i] as number;
    AI[i] = wl * (s.cl[i] as number) + wh * (s.ch[i] as number);
  }
  for (let i = 0; i < n; i++) {
    BR[i] = -(s.bg[i] as number);
    BI[i] = -(wl * (s.bcl[i] as number) + wh * (s.bch[i] as number));
  }
  if (inject >= 0) {
    // a 1 A test current into node `inject` instead of the source
    for (let i = 0; i < n; i++) BR[i] = BI[i] = 0;
    BR[inject] = 1;
  }
  for (let c = 0; c < n; c++) {
    let p = c;
    // pivot on |re| + |im| (Math.hypot is slow and the pivot only needs a size)
    let best = Math.abs(AR[c * n + c] as number) + Math.abs(AI[c * n + c] as number);
    for (let r = c + 1; r < n; r++) {
      const v = Math.abs(AR[r * n + c] as number) + Math.abs(AI[r * n + c] as number);
      if (v > best) {
        best = v;
        p = r;
      }
    }
    if (!(best > 1e-300)) return false;
    if (p !== c) {
      for (let k = 0; k < n; k++) {
        let t = AR[c * n + k] as number;
        AR[c * n + k] = AR[p * n + k] as number;
        AR[p * n + k] = t;
        t = AI[c * n + k] as number;
        AI[c * n + k] = AI[p * n + k] as number;
        AI[p * n + k] = t;
      }
      let t = BR[c] as number;
      BR[c] = BR[p] as number;
      BR[p] = t;
      t = BI[c] as number;
      BI[c] = BI[p] as number;
      BI[p] = t;
    }
    const pr = AR[c * n + c] as number;
    const pi = AI[c * n + c] as number;
    const pd = pr * pr + pi * pi;
    for (let r = c + 1; r < n; r++) {
      const ar = AR[r * n + c] as number;
      const ai = AI[r * n + c] as number;
      if (ar === 0 && ai === 0) continue;
      // f = a / pivot
      const fr = (ar * pr + ai * pi) / pd;
      const fi = (ai * pr - ar * pi) / pd;
      for (let k = c; k < n; k++) {
        const xr = AR[c * n + k] as number;
        const xi = AI[c * n + k] as number;
        AR[r * n + k] = (AR[r * n + k] as number) - (fr * xr - fi * xi);
        AI[r * n + k] = (AI[r * n + k] as number) - (fr * xi + fi * xr);
      }
      const xr = BR[c] as number;
      const xi = BI[c] as number;
      BR[r] = (BR[r] as number) - (fr * xr - fi * xi);
      BI[r] = (BI[r] as number) - (fr * xi + fi * xr);
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let sr = BR[r] as number;
    let si = BI[r] as number;
    for (let k = r + 1; k < n; k++) {
      const ar = AR[r * n + k] as number;
      const ai = AI[r * n + k] as number;
      const xr = BR[k] as number;
      const xi = BI[k] as number;
      sr -= ar * xr - ai * xi;
      si -= ar * xi + ai * xr;
    }
    const pr = AR[r * n + r] as number;
    const pi = AI[r * n + r] as number;
    const pd = pr * pr + pi * pi;
    BR[r] = (sr * pr + si * pi) / pd;
    BI[r] = (si * pr - sr * pi) / pd;
  }
  return true;
}

/** Angular frequency standing for "shorted" low-band capacitors (coupling and bypass) at mid band. */
const W_SHORT = 1e12;

export type AcOutput = { node: AcRef; scale: number };

/** Complex transfer from the source EMF to an output (scale · V(node)) at frequency f; the bands as given. */
export function transferAt(s: AcSystem, out: AcOutput, wl: number, wh: number, h: Float64Array): void {
  if (out.node < 0 || !solveAt(s, wl, wh, -1)) {
    h[0] = out.node === SOURCE ? out.scale : 0;
    h[1] = 0;
    return;
  }
  h[0] = out.scale * (BR[out.node] as number);
  h[1] = out.scale * (BI[out.node] as number);
}

const H = new Float64Array(2);

/** |transfer| at mid band: low-band capacitors shorted, high-band ones open. */
export function midbandTransfer(s: AcSystem, out: AcOutput): number {
  transferAt(s, out, W_SHORT, 0, H);
  return H[0] as number;
}

/** Impedance at a node at mid band (the source at 0 V): the node's Thevenin impedance in the network as given. */
export function nodeImpedance(s: AcSystem, node: number): number {
  if (!solveAt(s, W_SHORT, 0, node)) return 0;
  return Math.hypot(BR[node] as number, BI[node] as number);
}

export function responseCurveAc(s: AcSystem, out: AcOutput, points = 200, fmin = 10, fmax = 1e5): ResponsePoint[] {
  return responseCurvesAc(s, [out], points, fmin, fmax)[0] as ResponsePoint[];
}

/** Response curves of several outputs of one network (one solve per frequency), 10 Hz – 100 kHz, log spaced. */
export function responseCurvesAc(s: AcSystem, outs: AcOutput[], points = 200, fmin = 10, fmax = 1e5): ResponsePoint[][] {
  const res: ResponsePoint[][] = outs.map(() => []);
  const step = Math.log10(fmax / fmin) / (points - 1);
  for (let k = 0; k < points; k++) {
    const f = fmin * 10 ** (k * step);
    const w = 2 * Math.PI * f;
    const ok = solveAt(s, w, w, -1);
    outs.forEach((out, i) => {
      let re = 0;
      let im = 0;
      if (out.node === SOURCE) re = out.scale;
      else if (ok && out.node >= 0) {
        re = out.scale * (BR[out.node] as number);
        im = out.scale * (BI[out.node] as number);
      }
      const mag = Math.hypot(re, im);
      (res[i] as ResponsePoint[]).push({ frequency: f, magnitudeDb: mag > 0 ? 20 * Math.log10(mag) : -300, phaseDeg: (Math.atan2(im, re) * 180) / Math.PI });
    });
  }
  return res;
}

/** The transfer at one frequency (both bands), as magnitude in dB and phase in degrees. */
export function responseAt(s: AcSystem, out: AcOutput, f: number): ResponsePoint {
  const w = 2 * Math.PI * f;
  transferAt(s, out, w, w, H);
  const mag = Math.hypot(H[0] as number, H[1] as number);
  return { frequency: f, magnitudeDb: mag > 0 ? 20 * Math.log10(mag) : -300, phaseDeg: (Math.atan2(H[1] as number, H[0] as number) * 180) / Math.PI };
}

function hasBand(s: AcSystem, band: 'low' | 'high'): boolean {
  const m = band === 'low' ? s.cl : s.ch;
  for (let i = 0; i < m.length; i++) if (m[i] !== 0) return true;
  return false;
}

/**
 * −3 dB frequency of one band alone relative to mid band, by bisection on log f (40 steps: 1e-11 decades);
 * null when the band has no capacitors or never falls 3 dB (e.g. a bypassed stage whose unbypassed gain is
 * within 3 dB).
 */
export function cutoffAc(s: AcSystem, out: AcOutput, band: 'low' | 'high'): number | null {
  if (!hasBand(s, band)) return null;
  const mid = Math.abs(midbandTransfer(s, out));
  if (!(mid > 0)) return null;
  const target = Math.SQRT1_2 * mid;
  const mag = (logf: number) => {
    const w = 2 * Math.PI * 10 ** logf;
    if (band === 'low') transferAt(s, out, w, 0, H);
    else transferAt(s, out, W_SHORT, w, H);
    return Math.hypot(H[0] as number, H[1] as number);
  };
  let lo = -6;
  let hi = 12;
  const below = (logf: number) => (band === 'low' ? mag(logf) < target : mag(logf) > target);
  if (band === 'low' ? mag(hi) < target || mag(lo) >= target : mag(lo) < target || mag(hi) >= target) return null;
  for (let k = 0; k < 40; k++) {
    const m = 0.5 * (lo + hi);
    if (below(m)) lo = m;
    else hi = m;
  }
  return 10 ** (0.5 * (lo + hi));
}
