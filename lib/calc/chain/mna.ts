import { CalcError } from '../errors';
import type { TubeModel } from '../models/registry';
import type { Circuit, Probe } from './circuit';

/**
 * Nodal analysis of a whole circuit (modified nodal analysis: node voltages plus the two winding currents of each
 * push-pull transformer). Three solutions share one compiled form:
 * - DC operating point (capacitors open, inductors shorted), Newton with source stepping as the fallback;
 * - the periodic steady state under a sine drive: trapezoidal time steps over one period (one Newton solve of the
 *   whole circuit per step, so every stage sees the actual waveform of the one before it, clipped or not), and
 *   shooting on the capacitor/inductor states (x(T) = x(0)). The shooting Jacobian is the one-period transition
 *   matrix of the circuit linearised at the operating point (one-step matrix raised to the N-th power by squaring),
 *   improved by Broyden updates when the drive is large enough to change the tubes' slopes;
 * - the small-signal response at any frequency (complex nodal equations of the linearised circuit, with the
 *   tubes' interelectrode capacitances).
 */

/** Inductors at DC: a 0.1 mΩ short keeps the matrix regular. */
const G_SHORT = 1e4;
/** Capacitors below this (interelectrode, stray) take backward-Euler steps. */
const STIFF_CAPACITANCE = 1e-9;
const capG = (c: { c: number; be: boolean }, h: number) => (c.be ? c.c / h : (2 * c.c) / h);

type Term = number; // ≥ 0 unknown, −1 ground, ≤ −2 fixed node (−2 − index)

export type Compiled = {
  circuit: Circuit;
  /** unknown node names, then winding currents */
  names: string[];
  nodes: number;
  size: number;
  index: (name: string) => Term;
  fixedDc: Float64Array;
  fixedSignal: Float64Array;
  res: { a: Term; b: Term; g: number }[];
  /** be: backward Euler for the interelectrode capacitances (stiff next to h; the trapezoidal rule would ring) */
  caps: { a: Term; b: Term; c: number; be: boolean }[];
  inds: { a: Term; b: Term; l: number }[];
  currents: { a: Term; b: Term; i: number }[];
  wind: { n1: Term; p1: Term; n2: Term; p2: Term; k: number; row: number }[];
  /** ideal transformers: one primary-current unknown each, after the winding currents */
  xfmr: { p1: Term; p2: Term; s1: Term; s2: Term; ratio: number; row: number }[];
  tubes: { p: Term; g: Term; k: Term; s: Term; model: TubeModel; pentode: boolean }[];
};

export function compile(circuit: Circuit): Compiled {
  const fixedNames = new Map<string, number>();
  const fixedDc: number[] = [];
  const fixedSignal: number[] = [];
  for (const f of circuit.fixed) {
    const n = circuit.find(f.node);
    if (n === '0') throw new CalcError('invalid-input', `A fixed voltage is tied to ground (${f.node}).`);
    if (fixedNames.has(n)) throw new CalcError('invalid-input', `Two fixed voltages drive the same node (${f.node}).`);
    fixedNames.set(n, fixedDc.length);
    fixedDc.push(f.dc);
    fixedSignal.push(f.signal);
  }
  const unknown = new Map<string, number>();
  const names: string[] = [];
  const index = (name: string): Term => {
    const n = circuit.find(name);
    if (n === '0') return -1;
    const f = fixedNames.get(n);
    if (f !== undefined) return -2 - f;
    let u = unknown.get(n);
    if (u === undefined) {
      u = names.length;
      unknown.set(n, u);
      names.push(n);
    }
    return u;
  };
  const res = circuit.resistors.map((r) => {
    if (!(r.r > 0)) throw new CalcError('invalid-input', `Resistor ${r.name} must be positive.`);
    return { a: index(r.a), b: index(r.b), g: 1 / r.r };
  });
  const caps = circuit.capacitors.map((c) => ({ a: index(c.a), b: index(c.b), c: c.c, be: c.c < STIFF_CAPACITANCE })).filter((c) => c.a !== c.b);
  const inds = circuit.inductors.map((l) => ({ a: index(l.a), b: index(l.b), l: l.l }));
  const currents = circuit.currents.map((c) => ({ a: index(c.a), b: index(c.b), i: c.i }));
  const tubes = circuit.tubes.map((t) => ({
    p: index(t.plate),
    g: index(t.grid),
    k: index(t.cathode),
    s: t.screen ? index(t.screen) : -1,
    model: t.model,
    pentode: t.model.kind === 'pentode' && t.screen !== null,
  }));
  const windTerms = circuit.windings.map((w) => ({ n1: index(w.n1), p1: index(w.p1), n2: index(w.n2), p2: index(w.p2), k: w.k }));
  const xfmr = circuit.transformers.map((t) => ({ p1: index(t.p1), p2: index(t.p2), s1: index(t.s1), s2: index(t.s2), ratio: t.ratio, row: 0 }));
  const nodes = names.length;
  const wind = windTerms.map((w, i) => ({ ...w, row: nodes + 2 * i }));
  for (const w of wind) names.push(`i(${w.row})`, `i(${w.row + 1})`);
  for (const t of xfmr) {
    t.row = names.length;
    names.push(`i(${t.row})`);
  }
  return {
    circuit,
    names,
    nodes,
    size: names.length,
    index,
    fixedDc: Float64Array.from(fixedDc),
    fixedSignal: Float64Array.from(fixedSignal),
    res,
    caps,
    inds,
    currents,
    wind,
    xfmr,
    tubes,
  };
}

// ---------- dense linear algebra (row-major, partial pivoting) ----------

export function luFactor(a: Float64Array, n: number, perm: Int32Array): boolean {
  for (let i = 0; i < n; i++) perm[i] = i;
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
      const t = perm[c] as number;
      perm[c] = perm[p] as number;
      perm[p] = t;
    }
    const piv = a[c * n + c] as number;
    for (let r = c + 1; r < n; r++) {
      const f = (a[r * n + c] as number) / piv;
      if (f === 0) continue;
      a[r * n + c] = f;
      for (let k = c + 1; k < n; k++) a[r * n + k] = (a[r * n + k] as number) - f * (a[c * n + k] as number);
    }
  }
  return true;
}

/** Solves with a factor from luFactor; b is permuted into x. */
export function luSolve(a: Float64Array, n: number, perm: Int32Array, b: Float64Array, x: Float64Array): void {
  for (let i = 0; i < n; i++) x[i] = b[perm[i] as number] as number;
  for (let i = 0; i < n; i++) {
    let s = x[i] as number;
    for (let k = 0; k < i; k++) s -= (a[i * n + k] as number) * (x[k] as number);
    x[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = x[i] as number;
    for (let k = i + 1; k < n; k++) s -= (a[i * n + k] as number) * (x[k] as number);
    x[i] = s / (a[i * n + i] as number);
  }
}

function matMul(a: Float64Array, b: Float64Array, n: number, out: Float64Array): void {
  out.fill(0);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) {
      const aik = a[i * n + k] as number;
      if (aik === 0) continue;
      const bo = k * n;
      const oo = i * n;
      for (let j = 0; j < n; j++) out[oo + j] = (out[oo + j] as number) + aik * (b[bo + j] as number);
    }
  }
}

function invert(a: Float64Array, n: number): Float64Array | null {
  const lu = Float64Array.from(a);
  const perm = new Int32Array(n);
  if (!luFactor(lu, n, perm)) return null;
  const inv = new Float64Array(n * n);
  const e = new Float64Array(n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    luSolve(lu, n, perm, e, col);
    for (let i = 0; i < n; i++) inv[i * n + j] = col[i] as number;
  }
  return inv;
}

// ---------- assembly ----------

const PD = new Float64Array(4);
const SD = new Float64Array(3);
const GD = new Float64Array(2);

/** One object shape for every mode (keeps the assembly monomorphic). dc: capacitors open; inductors: 'short' or 'open' (the small-signal linearisation adds them itself). */
type Mode = { kind: 'dc' | 'tran'; inductors: 'short' | 'open' | 'step'; h: number; capV: Float64Array; capI: Float64Array; indV: Float64Array; indI: Float64Array };
const EMPTY = new Float64Array(0);
const dcMode = (inductors: 'short' | 'open'): Mode => ({ kind: 'dc', inductors, h: 0, capV: EMPTY, capI: EMPTY, indV: EMPTY, indI: EMPTY });

const volt = (x: Float64Array, fixed: Float64Array, t: Term) => (t >= 0 ? (x[t] as number) : t === -1 ? 0 : (fixed[-2 - t] as number));

function addJ(j: Float64Array, n: number, r: Term, c: Term, v: number) {
  if (r >= 0 && c >= 0) j[r * n + c] = (j[r * n + c] as number) + v;
}
function addF(f: Float64Array, r: Term, v: number) {
  if (r >= 0) f[r] = (f[r] as number) + v;
}

function stamp(f: Float64Array, jac: Float64Array | null, n: number, a: Term, b: Term, g: number, i: number): void {
  if (a >= 0) f[a] = (f[a] as number) + i;
  if (b >= 0) f[b] = (f[b] as number) - i;
  if (jac) {
    if (a >= 0) {
      jac[a * n + a] = (jac[a * n + a] as number) + g;
      if (b >= 0) jac[a * n + b] = (jac[a * n + b] as number) - g;
    }
    if (b >= 0) {
      jac[b * n + b] = (jac[b * n + b] as number) + g;
      if (a >= 0) jac[b * n + a] = (jac[b * n + a] as number) - g;
    }
  }
}

/** The Jacobian of the linear elements for a mode (cached per compiled circuit and step). */
const linearCache = new WeakMap<Compiled, Map<number, Float64Array>>();
function linearJacobian(cp: Compiled, mode: Mode): Float64Array {
  const key = mode.kind === 'dc' ? (mode.inductors === 'short' ? 0 : -1) : mode.h;
  let m = linearCache.get(cp);
  if (!m) linearCache.set(cp, (m = new Map()));
  let j = m.get(key);
  if (j) return j;
  const n = cp.size;
  j = new Float64Array(n * n);
  const f = new Float64Array(n);
  const zero = new Float64Array(n);
  const fixed = new Float64Array(cp.fixedDc.length);
  assembleLinear(cp, mode, fixed, zero, f, j);
  if (m.size > 8) m.clear();
  m.set(key, j);
  return j;
}

function assembleLinear(cp: Compiled, mode: Mode, fixed: Float64Array, x: Float64Array, f: Float64Array, jac: Float64Array | null): void {
  const n = cp.size;
  assembleTransformers(cp, fixed, x, f, jac);
  for (let q = 0; q < cp.res.length; q++) {
    const r = cp.res[q]!;
    stamp(f, jac, n, r.a, r.b, r.g, r.g * (volt(x, fixed, r.a) - volt(x, fixed, r.b)));
  }
  for (let q = 0; q < cp.currents.length; q++) {
    const e = cp.currents[q]!;
    addF(f, e.a, e.i);
    addF(f, e.b, -e.i);
  }
  if (mode.kind === 'tran') {
    for (let c = 0; c < cp.caps.length; c++) {
      const e = cp.caps[c]!;
      const g = capG(e, mode.h);
      const v = volt(x, fixed, e.a) - volt(x, fixed, e.b);
      stamp(f, jac, n, e.a, e.b, g, g * (v - (mode.capV[c] as number)) - (e.be ? 0 : (mode.capI[c] as number)));
    }
    for (let l = 0; l < cp.inds.length; l++) {
      const e = cp.inds[l]!;
      const g = mode.h / (2 * e.l);
      const v = volt(x, fixed, e.a) - volt(x, fixed, e.b);
      stamp(f, jac, n, e.a, e.b, g, (mode.indI[l] as number) + g * (v + (mode.indV[l] as number)));
    }
  } else if (mode.inductors === 'short') {
    for (let l = 0; l < cp.inds.length; l++) {
      const e = cp.inds[l]!;
      stamp(f, jac, n, e.a, e.b, G_SHORT, G_SHORT * (volt(x, fixed, e.a) - volt(x, fixed, e.b)));
    }
  }
  for (let q = 0; q < cp.wind.length; q++) {
    const w = cp.wind[q]!;
    const i1 = x[w.row] as number;
    const i2 = x[w.row + 1] as number;
    addF(f, w.n1, i1);
    addF(f, w.p1, -i1);
    addF(f, w.n2, i2);
    addF(f, w.p2, -i2);
    f[w.row] = volt(x, fixed, w.n1) - volt(x, fixed, w.p1) - w.k * (i1 - i2);
    f[w.row + 1] = volt(x, fixed, w.n2) - volt(x, fixed, w.p2) + w.k * (i1 - i2);
    if (jac) {
      addJ(jac, n, w.n1, w.row, 1);
      addJ(jac, n, w.p1, w.row, -1);
      addJ(jac, n, w.n2, w.row + 1, 1);
      addJ(jac, n, w.p2, w.row + 1, -1);
      addJ(jac, n, w.row, w.n1, 1);
      addJ(jac, n, w.row, w.p1, -1);
      jac[w.row * n + w.row] = (jac[w.row * n + w.row] as number) - w.k;
      jac[w.row * n + w.row + 1] = (jac[w.row * n + w.row + 1] as number) + w.k;
      addJ(jac, n, w.row + 1, w.n2, 1);
      addJ(jac, n, w.row + 1, w.p2, -1);
      jac[(w.row + 1) * n + w.row] = (jac[(w.row + 1) * n + w.row] as number) + w.k;
      jac[(w.row + 1) * n + w.row + 1] = (jac[(w.row + 1) * n + w.row + 1] as number) - w.k;
    }
  }
}

/** Ideal transformers: primary current i leaves p1 and enters p2; −ratio·i enters s1 (linear, so cached with the rest). */
function assembleTransformers(cp: Compiled, fixed: Float64Array, x: Float64Array, f: Float64Array, jac: Float64Array | null): void {
  const n = cp.size;
  for (let q = 0; q < cp.xfmr.length; q++) {
    const t = cp.xfmr[q]!;
    const i = x[t.row] as number;
    addF(f, t.p1, i);
    addF(f, t.p2, -i);
    addF(f, t.s1, -t.ratio * i);
    addF(f, t.s2, t.ratio * i);
    f[t.row] = volt(x, fixed, t.p1) - volt(x, fixed, t.p2) - t.ratio * (volt(x, fixed, t.s1) - volt(x, fixed, t.s2));
    if (jac) {
      addJ(jac, n, t.p1, t.row, 1);
      addJ(jac, n, t.p2, t.row, -1);
      addJ(jac, n, t.s1, t.row, -t.ratio);
      addJ(jac, n, t.s2, t.row, t.ratio);
      addJ(jac, n, t.row, t.p1, 1);
      addJ(jac, n, t.row, t.p2, -1);
      addJ(jac, n, t.row, t.s1, -t.ratio);
      addJ(jac, n, t.row, t.s2, t.ratio);
    }
  }
}

/** Residual (currents leaving each unknown node; winding equations) and its Jacobian at x. */
function assemble(cp: Compiled, mode: Mode, fixed: Float64Array, x: Float64Array, f: Float64Array, jac: Float64Array | null): void {
  const n = cp.size;
  f.fill(0);
  if (jac) jac.set(linearJacobian(cp, mode));
  assembleLinear(cp, mode, fixed, x, f, null);
  for (let q = 0; q < cp.tubes.length; q++) {
    const t = cp.tubes[q]!;
    const vk = volt(x, fixed, t.k);
    const vak = volt(x, fixed, t.p) - vk;
    const vgk = volt(x, fixed, t.g) - vk;
    const vsk = t.pentode ? volt(x, fixed, t.s) - vk : 0;
    const ia = t.model.plateCurrentD!(vak, vgk, vsk, PD);
    const pa = PD[1] as number;
    const pg = PD[2] as number;
    const ps = t.pentode ? (PD[3] as number) : 0;
    let ig = 0;
    let gg = 0;
    if (vgk > 0) {
      ig = t.model.gridCurrentD!(vgk, GD);
      gg = GD[1] as number;
    }
    let is = 0;
    let sg = 0;
    let ss = 0;
    if (t.pentode) {
      is = t.model.screenCurrentD!(vgk, vsk, SD);
      sg = SD[1] as number;
      ss = SD[2] as number;
    }
    addF(f, t.p, ia);
    addF(f, t.g, ig);
    if (t.pentode) addF(f, t.s, is);
    addF(f, t.k, -(ia + ig + is));
    if (jac) {
      // plate row
      addJ(jac, n, t.p, t.p, pa);
      addJ(jac, n, t.p, t.g, pg);
      if (t.pentode) addJ(jac, n, t.p, t.s, ps);
      addJ(jac, n, t.p, t.k, -(pa + pg + ps));
      // grid row
      if (gg !== 0) {
        addJ(jac, n, t.g, t.g, gg);
        addJ(jac, n, t.g, t.k, -gg);
      }
      // screen row
      if (t.pentode) {
        addJ(jac, n, t.s, t.g, sg);
        addJ(jac, n, t.s, t.s, ss);
        addJ(jac, n, t.s, t.k, -(sg + ss));
      }
      // cathode row: minus the sum
      const kp = pa;
      const kg = pg + gg + sg;
      const ks = ps + ss;
      addJ(jac, n, t.k, t.p, -kp);
      addJ(jac, n, t.k, t.g, -kg);
      if (t.pentode) addJ(jac, n, t.k, t.s, -ks);
      addJ(jac, n, t.k, t.k, kp + kg + ks);
    }
  }
}

type Work = { f: Float64Array; j: Float64Array; perm: Int32Array; dx: Float64Array; neg: Float64Array; factored: boolean };
function work(n: number): Work {
  return { f: new Float64Array(n), j: new Float64Array(n * n), perm: new Int32Array(n), dx: new Float64Array(n), neg: new Float64Array(n), factored: false };
}

/** Newton on the whole circuit from x (updated in place). Returns the iteration count, or −1. */
/** Counters of the waveform solver's work (a load-independent cost measure for the benchmark). */
export const chainWork = { newtonIterations: 0, factorizations: 0 };

/**
 * Newton on the whole circuit from x (updated in place). Returns the iteration count, or −1.
 * With `chord`, the factored Jacobian left in `w` by an earlier solve is reused while it keeps converging fast
 * (consecutive waveform samples have nearly the same Jacobian); it is refactored as soon as a step shrinks by
 * less than a factor 4, so the answer is the same Newton root to the same tolerance.
 */
function newton(cp: Compiled, mode: Mode, fixed: Float64Array, x: Float64Array, w: Work, maxStep: number, maxIter = 60, chord = false): number {
  const n = cp.size;
  let useOld = chord && w.factored;
  let lastBig = Infinity;
  for (let it = 1; it <= maxIter; it++) {
    chainWork.newtonIterations++;
    assemble(cp, mode, fixed, x, w.f, useOld ? null : w.j);
    if (it > 1) {
      // a residual at rounding level ends the iteration (a stiff coupling capacitor can amplify that noise)
      let fmax = 0;
      for (let i = 0; i < cp.nodes; i++) fmax = Math.max(fmax, Math.abs(w.f[i] as number));
      if (fmax < 1e-11) return it;
    }
    if (!useOld) {
      chainWork.factorizations++;
      w.factored = false;
      if (!luFactor(w.j, n, w.perm)) return -1;
      w.factored = true;
    }
    for (let i = 0; i < n; i++) w.neg[i] = -(w.f[i] as number);
    luSolve(w.j, n, w.perm, w.neg, w.dx);
    let big = 0;
    for (let i = 0; i < cp.nodes; i++) big = Math.max(big, Math.abs(w.dx[i] as number));
    if (!Number.isFinite(big)) return -1;
    if (useOld && (big > 0.25 * lastBig || it > 6) && big > 1e-7) {
      // the old Jacobian converges too slowly here: refactor at this point, step not taken
      useOld = false;
      lastBig = Infinity;
      continue;
    }
    lastBig = big;
    const s = big > maxStep ? maxStep / big : 1;
    let small = true;
    for (let i = 0; i < n; i++) {
      const d = s * (w.dx[i] as number);
      const xi = x[i] as number;
      x[i] = xi + d;
      // full Newton converges quadratically: after a step this small the remaining error is far below it
      const tol = useOld ? (i < cp.nodes ? 1e-8 + 1e-10 * Math.abs(xi) : 1e-13 + 1e-9 * Math.abs(xi)) : i < cp.nodes ? 1e-5 + 1e-8 * Math.abs(xi) : 1e-10 + 1e-7 * Math.abs(xi);
      if (Math.abs(d) > tol) small = false;
    }
    if (small && s === 1) return it;
  }
  return -1;
}

export type DcSolution = { x: Float64Array; fixed: Float64Array };

export function solveDc(cp: Compiled): DcSolution {
  const n = cp.size;
  const w = work(n);
  const fixed = Float64Array.from(cp.fixedDc);
  const x = new Float64Array(n);
  const mode: Mode = dcMode('short');
  if (newton(cp, mode, fixed, x, w, 25, 200) > 0) return { x, fixed };
  // source stepping from a small fraction of every fixed voltage
  x.fill(0);
  const steps = 20;
  for (let s = 1; s <= steps; s++) {
    for (let i = 0; i < fixed.length; i++) fixed[i] = ((cp.fixedDc[i] as number) * s) / steps;
    if (newton(cp, mode, fixed, x, w, 10, 200) < 0) {
      throw new CalcError('no-solution', 'The operating point of the chain could not be solved for these values.');
    }
  }
  return { x, fixed: Float64Array.from(cp.fixedDc) };
}

// ---------- periodic steady state ----------

export type Cycle = {
  /** N solved samples (row-major N × size) at t = T/N … T */
  xs: Float64Array;
  samples: number;
  amplitude: number;
  frequency: number;
  fixedAt: (k: number, out: Float64Array) => Float64Array;
  newtonIterations: number;
  shootingIterations: number;
};

type State = Float64Array; // [capV..., capI..., indI..., indV...]

function stateSize(cp: Compiled) {
  return 2 * cp.caps.length + 2 * cp.inds.length;
}

function stateFromDc(cp: Compiled, dc: DcSolution): State {
  const s = new Float64Array(stateSize(cp));
  const nc = cp.caps.length;
  cp.caps.forEach((c, i) => (s[i] = volt(dc.x, dc.fixed, c.a) - volt(dc.x, dc.fixed, c.b)));
  cp.inds.forEach((l, i) => {
    const v = volt(dc.x, dc.fixed, l.a) - volt(dc.x, dc.fixed, l.b);
    s[2 * nc + i] = G_SHORT * v;
    s[2 * nc + cp.inds.length + i] = 0;
  });
  return s;
}

/**
 * The one-period transition matrix of the circuit linearised at the operating point (trapezoidal steps of h):
 * one-step matrix M (one column per state: a solve with the operating-point Jacobian), then M^N by squaring.
 */
/**
 * One trapezoidal step's state transition for the circuit linearised where `w` holds a factored Jacobian:
 * column j = the change of the next state for a unit change of state j (one solve per state).
 */
function stepMatrix(cp: Compiled, w: Work, h: number, M: Float64Array): void {
  const n = cp.size;
  const S = stateSize(cp);
  const nc = cp.caps.length;
  const nl = cp.inds.length;
  const rhs = new Float64Array(n);
  const dx = new Float64Array(n);
  const dv = (t: Term) => (t >= 0 ? (dx[t] as number) : 0);
  for (let j = 0; j < S; j++) {
    rhs.fill(0);
    // −∂F/∂s_j
    if (j < nc) {
      const c = cp.caps[j]!;
      const g = capG(c, h);
      addF(rhs, c.a, g);
      addF(rhs, c.b, -g);
    } else if (j < 2 * nc) {
      const c = cp.caps[j - nc]!;
      if (!c.be) {
        addF(rhs, c.a, 1);
        addF(rhs, c.b, -1);
      }
    } else if (j < 2 * nc + nl) {
      const l = cp.inds[j - 2 * nc]!;
      addF(rhs, l.a, -1);
      addF(rhs, l.b, 1);
    } else {
      const l = cp.inds[j - 2 * nc - nl]!;
      const g = h / (2 * l.l);
      addF(rhs, l.a, -g);
      addF(rhs, l.b, g);
    }
    luSolve(w.j, n, w.perm, rhs, dx);
    for (let c = 0; c < nc; c++) {
      const e = cp.caps[c]!;
      const v1 = dv(e.a) - dv(e.b);
      const v0 = j === c ? 1 : 0;
      const i0 = j === nc + c ? 1 : 0;
      M[c * S + j] = v1;
      M[(nc + c) * S + j] = capG(e, h) * (v1 - v0) - (e.be ? 0 : i0);
    }
    for (let l = 0; l < nl; l++) {
      const e = cp.inds[l]!;
      const v1 = dv(e.a) - dv(e.b);
      const i0 = j === 2 * nc + l ? 1 : 0;
      const v0 = j === 2 * nc + nl + l ? 1 : 0;
      M[(2 * nc + l) * S + j] = i0 + (h / (2 * e.l)) * (v1 + v0);
      M[(2 * nc + nl + l) * S + j] = v1;
    }
  }
}

function periodTransition(cp: Compiled, dc: DcSolution, h: number, steps: number): Float64Array {
  const n = cp.size;
  const S = stateSize(cp);
  const nc = cp.caps.length;
  const nl = cp.inds.length;
  const w = work(n);
  const zeroS = new Float64Array(S);
  const mode: Mode = { kind: 'tran', inductors: 'step', h, capV: zeroS.subarray(0, nc), capI: zeroS.subarray(nc, 2 * nc), indI: zeroS.subarray(2 * nc, 2 * nc + nl), indV: zeroS.subarray(2 * nc + nl) };
  assemble(cp, mode, dc.fixed, dc.x, w.f, w.j);
  if (!luFactor(w.j, n, w.perm)) throw new CalcError('no-solution', 'The chain\'s circuit matrix is singular (a node without a DC path?).');
  const M = new Float64Array(S * S);
  stepMatrix(cp, w, h, M);
  const zero = 0;
  void zero;
  // M^steps (steps a power of two)
  let p = M;
  let tmp = new Float64Array(S * S);
  for (let k = 1; k < steps; k *= 2) {
    matMul(p, p, S, tmp);
    const t = p;
    p = tmp;
    tmp = t === M ? new Float64Array(S * S) : t;
  }
  return p;
}

export type SteadyOptions = { samples?: number; start?: SteadyStart; maxShooting?: number };
export type SteadyStart = { state: State; x: Float64Array; h?: Float64Array };

/**
 * Periodic steady state for a sine of `amplitude` (V peak at the signal source) and `frequency`.
 * `start` continues from a neighbouring solution (the level sweep).
 */
export function steadyState(
  cp: Compiled,
  dc: DcSolution,
  amplitude: number,
  frequency: number,
  options: SteadyOptions = {},
): Cycle & { start: SteadyStart } {
  const N = options.samples ?? 128;
  const n = cp.size;
  const S = stateSize(cp);
  const nc = cp.caps.length;
  const nl = cp.inds.length;
  const T = 1 / frequency;
  const h = T / N;
  const w = work(n);
  const fixed = new Float64Array(cp.fixedDc.length);
  const sinTab = new Float64Array(N + 1);
  for (let k = 0; k <= N; k++) sinTab[k] = Math.sin((2 * Math.PI * k) / N);
  const fixedAt = (k: number, out: Float64Array) => {
    for (let i = 0; i < out.length; i++) out[i] = (cp.fixedDc[i] as number) + amplitude * (cp.fixedSignal[i] as number) * (sinTab[k % N] as number);
    return out;
  };
  let H = options.start?.h;
  if (!H || H.length !== S * S) {
    const phi = periodTransition(cp, dc, h, N);
    for (let i = 0; i < S; i++) phi[i * S + i] = (phi[i * S + i] as number) - 1;
    const inv = invert(phi, S);
    if (!inv) throw new CalcError('no-solution', 'The chain has no periodic steady state (an undamped capacitor or inductor loop).');
    H = inv;
  }
  let s0: State = options.start ? Float64Array.from(options.start.state) : stateFromDc(cp, dc);
  const xStart = options.start ? Float64Array.from(options.start.x) : Float64Array.from(dc.x);
  let xs: Float64Array = new Float64Array(N * n);
  let xsPrev: Float64Array | null = null;
  let cycles = 0;
  const sCur = new Float64Array(S);
  const x = new Float64Array(n);
  let newtonTotal = 0;

  // with `sens`, the exact one-period transition of the circuit linearised along the solved waveform
  let sens: { phi: Float64Array; m: Float64Array; tmp: Float64Array } | null = null;
  const runCycle = (state: State): State => {
    if (sens) {
      sens.phi.fill(0);
      for (let i = 0; i < S; i++) sens.phi[i * S + i] = 1;
    }
    if (cycles > 0) {
      const t = xsPrev ?? new Float64Array(N * n);
      xsPrev = xs;
      xs = t;
    }
    cycles++;
    sCur.set(state);
    const mode: Mode = { kind: 'tran', inductors: 'step', h, capV: sCur.subarray(0, nc), capI: sCur.subarray(nc, 2 * nc), indI: sCur.subarray(2 * nc, 2 * nc + nl), indV: sCur.subarray(2 * nc + nl) };
    for (let k = 1; k <= N; k++) {
      fixedAt(k, fixed);
      // predictor: the previous cycle at this phase, moved by the change seen at the previous sample; on the
      // first cycle a quadratic extrapolation along the waveform
      if (xsPrev && k >= 2) {
        const o0 = (k - 1) * n;
        const o1 = (k - 2) * n;
        for (let i = 0; i < n; i++) x[i] = (xsPrev[o0 + i] as number) + (xs[o1 + i] as number) - (xsPrev[o1 + i] as number);
      } else if (xsPrev) {
        for (let i = 0; i < n; i++) x[i] = xsPrev[i] as number;
      } else if (k >= 4) {
        const o1 = (k - 2) * n;
        const o2 = (k - 3) * n;
        const o3 = (k - 4) * n;
        for (let i = 0; i < n; i++) x[i] = 3 * (xs[o1 + i] as number) - 3 * (xs[o2 + i] as number) + (xs[o3 + i] as number);
      } else if (k === 1) x.set(xStart);
      else x.set(xs.subarray((k - 2) * n, (k - 1) * n));
      const it = newton(cp, mode, fixed, x, w, 50, 60, false);
      if (it < 0) {
        // restart this step from the last solved sample with smaller moves
        x.set(k >= 2 ? xs.subarray((k - 2) * n, (k - 1) * n) : xStart);
        if (newton(cp, mode, fixed, x, w, 2, 400) < 0) {
          throw new CalcError('no-solution', 'The chain could not be solved at this drive level (the circuit did not converge on a waveform step).');
        }
      }
      newtonTotal += Math.max(it, 1);
      xs.set(x, (k - 1) * n);
      if (sens) {
        // the state enters the residual linearly: the Jacobian at the solved sample gives this step's transition
        assemble(cp, mode, fixed, x, w.f, w.j);
        if (luFactor(w.j, n, w.perm)) {
          stepMatrix(cp, w, h, sens.m);
          matMul(sens.m, sens.phi, S, sens.tmp);
          sens.phi.set(sens.tmp);
        }
        w.factored = false;
      }
      // trapezoidal state update
      for (let c = 0; c < nc; c++) {
        const e = cp.caps[c]!;
        const v1 = volt(x, fixed, e.a) - volt(x, fixed, e.b);
        const i1 = capG(e, h) * (v1 - (sCur[c] as number)) - (e.be ? 0 : (sCur[nc + c] as number));
        sCur[c] = v1;
        sCur[nc + c] = i1;
      }
      for (let l = 0; l < nl; l++) {
        const e = cp.inds[l]!;
        const v1 = volt(x, fixed, e.a) - volt(x, fixed, e.b);
        const i1 = (sCur[2 * nc + l] as number) + (h / (2 * e.l)) * (v1 + (sCur[2 * nc + nl + l] as number));
        sCur[2 * nc + l] = i1;
        sCur[2 * nc + nl + l] = v1;
      }
    }
    return Float64Array.from(sCur);
  };

  const maxShoot = options.maxShooting ?? 40;
  let r = new Float64Array(S);
  let sN = runCycle(s0);
  for (let i = 0; i < S; i++) r[i] = (sN[i] as number) - (s0[i] as number);
  let iter = 1;
  const vScale = 1e-6 * (1 + amplitude);
  const converged = (res: Float64Array, state: State) => {
    // rounding in the per-step solves sets a floor near 1e-7 of the largest capacitor voltage
    let vMax = 0;
    for (let c = 0; c < nc; c++) vMax = Math.max(vMax, Math.abs(state[c] as number));
    const vTol = vScale + 2e-7 * vMax;
    for (let c = 0; c < nc; c++) if (Math.abs(res[c] as number) > vTol) return false;
    let iMax = 1e-15;
    for (let c = 0; c < nc; c++) iMax = Math.max(iMax, Math.abs(state[nc + c] as number));
    for (let c = 0; c < nc; c++) if (Math.abs(res[nc + c] as number) > 1e-5 * iMax) return false;
    let lMax = 1e-12;
    for (let l = 0; l < nl; l++) lMax = Math.max(lMax, Math.abs(state[2 * nc + l] as number));
    for (let l = 0; l < nl; l++) if (Math.abs(res[2 * nc + l] as number) > 1e-5 * lMax) return false;
    for (let l = 0; l < nl; l++) if (Math.abs(res[2 * nc + nl + l] as number) > vScale) return false;
    return true;
  };
  const dS = new Float64Array(S);
  const Hr = new Float64Array(S);
  let exact = false;
  let best = Infinity;
  let stalled = 0;
  while (!converged(r, s0) && iter < maxShoot) {
    let norm = 0;
    for (let c = 0; c < nc; c++) norm = Math.max(norm, Math.abs(r[c] as number));
    if (norm < 0.5 * best) {
      best = norm;
      stalled = 0;
    } else stalled++;
    if ((!exact && (stalled >= 3 || iter >= 10)) || (exact && stalled >= 2)) {
      // Broyden from the operating point's linearisation is not getting there (hard clipping, grid current):
      // one cycle with the exact transition along the current waveform gives a fresh Jacobian, then Broyden again
      exact = true;
      sens = { phi: new Float64Array(S * S), m: new Float64Array(S * S), tmp: new Float64Array(S * S) };
      xStart.set(xs.subarray((N - 1) * n, N * n));
      sN = runCycle(s0);
      iter++;
      for (let i = 0; i < S; i++) r[i] = (sN[i] as number) - (s0[i] as number);
      const a = Float64Array.from(sens.phi);
      for (let i = 0; i < S; i++) a[i * S + i] = (a[i * S + i] as number) - 1;
      const inv = invert(a, S);
      if (inv) H = inv;
      sens = null;
      stalled = 0;
      best = Infinity;
      if (converged(r, s0)) break;
    }
    // Newton/Broyden step: s ← s − H·r with H ≈ (Φ − I)⁻¹
    for (let i = 0; i < S; i++) {
      let acc = 0;
      for (let j = 0; j < S; j++) acc += (H[i * S + j] as number) * (r[j] as number);
      dS[i] = -acc;
    }
    const s1 = new Float64Array(S);
    // start the next cycle from this cycle's last sample (the fast states are already settled there)
    const lastX = Float64Array.from(xs.subarray((N - 1) * n, N * n));
    for (let attempt = 0; ; attempt++) {
      for (let i = 0; i < S; i++) s1[i] = (s0[i] as number) + (dS[i] as number);
      xStart.set(lastX);
      try {
        sN = runCycle(s1);
        break;
      } catch (err) {
        // a step into states the circuit cannot follow (deep overdrive): take a shorter one
        if (!(err instanceof CalcError) || attempt >= 5) throw err;
        for (let i = 0; i < S; i++) dS[i] = 0.25 * (dS[i] as number);
      }
    }
    iter++;
    const r1 = new Float64Array(S);
    for (let i = 0; i < S; i++) r1[i] = (sN[i] as number) - (s1[i] as number);
    // good Broyden update of the inverse: H += (Δs − H·Δr)(Δsᵀ·H)/(Δsᵀ·H·Δr)
    const dr = new Float64Array(S);
    for (let i = 0; i < S; i++) dr[i] = (r1[i] as number) - (r[i] as number);
    for (let i = 0; i < S; i++) {
      let acc = 0;
      for (let j = 0; j < S; j++) acc += (H[i * S + j] as number) * (dr[j] as number);
      Hr[i] = acc;
    }
    let den = 0;
    for (let i = 0; i < S; i++) den += (dS[i] as number) * (Hr[i] as number);
    if (Math.abs(den) > 1e-300) {
      const sH = new Float64Array(S);
      for (let j = 0; j < S; j++) {
        let acc = 0;
        for (let i = 0; i < S; i++) acc += (dS[i] as number) * (H[i * S + j] as number);
        sH[j] = acc;
      }
      for (let i = 0; i < S; i++) {
        const u = ((dS[i] as number) - (Hr[i] as number)) / den;
        if (u === 0) continue;
        for (let j = 0; j < S; j++) H[i * S + j] = (H[i * S + j] as number) + u * (sH[j] as number);
      }
    }
    s0 = s1;
    r = r1;
  }
  if (!converged(r, s0)) {
    throw new CalcError('no-solution', 'The chain did not settle to a steady state at this drive level.');
  }
  return {
    xs,
    samples: N,
    amplitude,
    frequency,
    fixedAt,
    newtonIterations: newtonTotal,
    shootingIterations: iter,
    start: { state: s0, x: Float64Array.from(xs.subarray((N - 1) * n, N * n)), h: H },
  };
}

/** A probe's waveform over the solved cycle. */
export function probeWave(cp: Compiled, cycle: Cycle, probe: Probe): Float64Array {
  const n = cp.size;
  const N = cycle.samples;
  const out = new Float64Array(N);
  const fixed = new Float64Array(cp.fixedDc.length);
  const terms = probe.map(([name, w]) => [cp.index(name), w] as const);
  for (let k = 0; k < N; k++) {
    cycle.fixedAt(k + 1, fixed);
    const x = cycle.xs.subarray(k * n, (k + 1) * n);
    let v = 0;
    for (const [t, wgt] of terms) v += wgt * volt(x as Float64Array, fixed, t);
    out[k] = v;
  }
  return out;
}

export function probeDc(cp: Compiled, dc: DcSolution, probe: Probe): number {
  let v = 0;
  for (const [name, w] of probe) v += w * volt(dc.x, dc.fixed, cp.index(name));
  return v;
}

export function nodeVoltage(cp: Compiled, x: Float64Array, fixed: Float64Array, name: string): number {
  return volt(x, fixed, cp.index(name));
}

// ---------- small-signal response ----------

export type Linearised = { g: Float64Array; n: number; drive: Float64Array };

/** The DC Jacobian at the operating point (resistors, windings, tube slopes; capacitors open, inductors out). */
export function linearise(cp: Compiled, dc: DcSolution): Linearised {
  const n = cp.size;
  const f = new Float64Array(n);
  const j = new Float64Array(n * n);
  const open = dcMode('open');
  assemble(cp, open, dc.fixed, dc.x, f, j);
  // −∂F/∂u for the signal source u (central difference: the tubes may sit directly on the source node)
  const drive = new Float64Array(n);
  const fp = new Float64Array(n);
  const fm = new Float64Array(n);
  const delta = 1e-4;
  const shifted = (s: number) => {
    const fx = Float64Array.from(dc.fixed);
    for (let i = 0; i < fx.length; i++) fx[i] = (fx[i] as number) + s * (cp.fixedSignal[i] as number);
    return fx;
  };
  assemble(cp, open, shifted(delta), dc.x, fp, null);
  assemble(cp, open, shifted(-delta), dc.x, fm, null);
  for (let i = 0; i < n; i++) drive[i] = -((fp[i] as number) - (fm[i] as number)) / (2 * delta);
  return { g: j, n, drive };
}

/** Complex transfer from the signal source (unit amplitude on every signal-carrying fixed node) to each probe. */
export function acResponse(cp: Compiled, lin: Linearised, frequency: number, probes: Probe[]): Array<{ re: number; im: number }> {
  const n = lin.n;
  const w = 2 * Math.PI * frequency;
  // real 2n × 2n form [[G, −B], [B, G]]
  const m = 2 * n;
  const a = new Float64Array(m * m);
  for (let i = 0; i < n; i++)
    for (let k = 0; k < n; k++) {
      const g = lin.g[i * n + k] as number;
      a[i * m + k] = g;
      a[(i + n) * m + k + n] = g;
    }
  const addB = (r: Term, c: Term, b: number) => {
    if (r >= 0 && c >= 0) {
      a[r * m + c + n] = (a[r * m + c + n] as number) - b;
      a[(r + n) * m + c] = (a[(r + n) * m + c] as number) + b;
    }
  };
  const rhs = new Float64Array(m);
  // fixed node with signal: its unit AC voltage drives currents into its neighbours (moved to the right side)
  const sig = (t: Term) => (t <= -2 ? (cp.fixedSignal[-2 - t] as number) : 0);
  const stampY = (ta: Term, tb: Term, gRe: number, gIm: number) => {
    // admittance gRe + j·gIm between a and b
    if (gRe !== 0) {
      for (const [r, c, s] of [[ta, ta, 1], [ta, tb, -1], [tb, ta, -1], [tb, tb, 1]] as const) {
        if (r >= 0 && c >= 0) {
          a[r * m + c] = (a[r * m + c] as number) + s * gRe;
          a[(r + n) * m + c + n] = (a[(r + n) * m + c + n] as number) + s * gRe;
        }
      }
    }
    if (gIm !== 0) {
      addB(ta, ta, gIm);
      addB(ta, tb, -gIm);
      addB(tb, ta, -gIm);
      addB(tb, tb, gIm);
    }
    // source terms
    const ua = sig(ta);
    const ub = sig(tb);
    if (ua !== 0 || ub !== 0) {
      const du = ua - ub; // voltage difference from the source alone, real
      if (ta >= 0) {
        rhs[ta] = (rhs[ta] as number) - gRe * du;
        rhs[ta + n] = (rhs[ta + n] as number) - gIm * du;
      }
      if (tb >= 0) {
        rhs[tb] = (rhs[tb] as number) + gRe * du;
        rhs[tb + n] = (rhs[tb + n] as number) + gIm * du;
      }
    }
  };
  for (let i = 0; i < n; i++) rhs[i] = lin.drive[i] as number;
  for (const c of cp.caps) stampY(c.a, c.b, 0, w * c.c);
  for (const l of cp.inds) stampY(l.a, l.b, 0, -1 / (w * l.l));
  const perm = new Int32Array(m);
  if (!luFactor(a, m, perm)) throw new CalcError('no-solution', 'The small-signal circuit is singular.');
  const sol = new Float64Array(m);
  luSolve(a, m, perm, rhs, sol);
  const vr = (t: Term) => (t >= 0 ? (sol[t] as number) : sig(t));
  const vi = (t: Term) => (t >= 0 ? (sol[t + n] as number) : 0);
  return probes.map((p) => {
    let re = 0;
    let im = 0;
    for (const [name, wt] of p) {
      const t = cp.index(name);
      re += wt * vr(t);
      im += wt * vi(t);
    }
    return { re, im };
  });
}
