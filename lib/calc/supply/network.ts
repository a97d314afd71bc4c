// The supply as a small linear state-space network driven by one nonlinear element (the rectifier).
//
// Nodes are the shunt capacitors (node 0 = the reservoir, or with a choke input the first capacitor after the
// choke). Between consecutive nodes sits one branch: the series resistors and chokes of the sections between
// them, added up (R + L). States: every capacitor voltage and every inductive branch current. Loads are constant
// currents plus conductances (bleeders). The rectifier enters as one scalar input u:
//  - capacitor input: u is the rectifier current into node 0;
//  - choke input: u is the rectifier output voltage applied to the first choke.
// dx/dt = A·x + b + B·u, discretised with the trapezoidal rule on a fixed step:
//   x' = Ad·x + bd + md·(u + u'),  Ad = (I − hA/2)⁻¹(I + hA/2),  bd = h(I − hA/2)⁻¹b,  md = (h/2)(I − hA/2)⁻¹B.
import { CalcError } from '../errors';
import type { SupplyCircuit } from './types';

export type Branch = { into: number; resistance: number; inductance: number; sections: number[]; state: number };

export type Network = {
  capacitorInput: boolean;
  /** node count */
  k: number;
  capacitance: number[];
  meta: { key: string; name: string; voltageRating: number | null; section: number | null }[];
  /** branch feeding node j (null for the reservoir of a capacitor input) */
  branchInto: (Branch | null)[];
  /** state size */
  n: number;
  /** index of the state the rectifier couples to: v0 (capacitor input) or the first choke current */
  coupling: number;
  A: Float64Array;
  B: Float64Array;
  /** idle / full-drive load currents and load conductances per node */
  idle: number[];
  full: number[];
  conductance: number[];
};

const bad = (message: string): never => {
  throw new CalcError('invalid-input', message);
};

const positive = (v: unknown, what: string) => {
  if (typeof v !== 'number' || !Number.isFinite(v) || !(v > 0)) bad(`${what} must be a positive number.`);
  return v as number;
};
const nonNegative = (v: unknown, what: string) => {
  if (v === undefined) return 0;
  if (typeof v !== 'number' || !Number.isFinite(v) || v < 0) bad(`${what} must be zero or more.`);
  return v as number;
};

export function buildNetwork(c: SupplyCircuit): Network {
  const capacitorInput = !!c.reservoir;
  const capacitance: number[] = [];
  const meta: Network['meta'] = [];
  const branchInto: (Branch | null)[] = [];
  const addNode = (cap: { capacitance: number; voltageRating?: number; key?: string; name?: string }, section: number | null) => {
    const i = capacitance.length;
    capacitance.push(positive(cap.capacitance, section === null ? 'The reservoir capacitance' : `The capacitance of section ${section + 1}`));
    meta.push({
      key: cap.key?.trim() || `n${i}`,
      name: cap.name?.trim() || (i === 0 && capacitorInput ? 'Reservoir' : `Node ${i}`),
      voltageRating: typeof cap.voltageRating === 'number' && cap.voltageRating > 0 ? cap.voltageRating : null,
      section,
    });
  };
  if (capacitorInput) {
    addNode(c.reservoir!, null);
    branchInto.push(null);
  }
  let pendingR = 0;
  let pendingL = 0;
  let pending: number[] = [];
  (c.sections ?? []).forEach((s, idx) => {
    if (s.kind === 'capacitor') {
      if (capacitance.length > 0 && pending.length === 0) bad(`Section ${idx + 1} is a capacitor right after another capacitor: combine them into one.`);
      if (capacitance.length === 0 && pendingL <= 0) bad('Without a reservoir capacitor the filter must start with a choke (choke input).');
      branchInto.push({ into: capacitance.length, resistance: pendingR, inductance: pendingL, sections: pending, state: -1 });
      addNode(s, idx);
      pendingR = 0;
      pendingL = 0;
      pending = [];
    } else if (s.kind === 'resistor') {
      pendingR += positive(s.resistance, `The resistance of section ${idx + 1}`);
      pending.push(idx);
    } else if (s.kind === 'choke') {
      pendingL += positive(s.inductance, `The inductance of section ${idx + 1}`);
      pendingR += nonNegative(s.resistance, `The DC resistance of section ${idx + 1}`);
      pending.push(idx);
    } else {
      bad(`Section ${idx + 1} has an unknown kind.`);
    }
  });
  if (pending.length) bad('The filter ends in a series element: end it with a shunt capacitor (the node the stages draw from).');
  if (capacitance.length === 0) bad('The supply needs a reservoir capacitor or a choke followed by a capacitor.');
  const k = capacitance.length;
  const keys = new Set<string>();
  for (const m of meta) {
    if (keys.has(m.key)) bad(`Two nodes share the key '${m.key}'.`);
    keys.add(m.key);
  }

  // states: v0..v(k-1), then inductive branch currents
  let n = k;
  for (const br of branchInto) if (br && br.inductance > 0) br.state = n++;
  for (const br of branchInto) if (br && br.inductance <= 0 && !(br.resistance > 0)) bad(`The series resistance into node ${br.into} must be greater than zero.`);

  const idle = new Array<number>(k).fill(0);
  const full = new Array<number>(k).fill(0);
  const conductance = new Array<number>(k).fill(0);
  for (const [i, l] of (c.loads ?? []).entries()) {
    if (!Number.isInteger(l.node) || l.node < 0 || l.node >= k) bad(`Load ${i + 1} is on node ${l.node}, but the supply has nodes 0–${k - 1}.`);
    const cur = nonNegative(l.current, `The current of load ${i + 1}`);
    idle[l.node]! += cur;
    full[l.node]! += l.fullDriveCurrent === undefined ? cur : nonNegative(l.fullDriveCurrent, `The full-drive current of load ${i + 1}`);
    if (l.resistance !== undefined) conductance[l.node]! += 1 / positive(l.resistance, `The resistance of load ${i + 1}`);
  }

  const A = new Float64Array(n * n);
  const B = new Float64Array(n);
  const at = (r: number, col: number, v: number) => {
    A[r * n + col]! += v;
  };
  for (let j = 0; j < k; j++) {
    const C = capacitance[j]!;
    at(j, j, -conductance[j]! / C);
    // current in through branch j, out through branch j+1
    const bin = branchInto[j];
    if (bin) {
      if (bin.state >= 0) at(j, bin.state, 1 / C);
      else {
        const g = 1 / bin.resistance;
        at(j, j, -g / C);
        at(j, j - 1, g / C);
      }
    }
    const bout = branchInto[j + 1];
    if (bout) {
      if (bout.state >= 0) at(j, bout.state, -1 / C);
      else {
        const g = 1 / bout.resistance;
        at(j, j, -g / C);
        at(j, j + 1, g / C);
      }
    }
  }
  for (const br of branchInto) {
    if (!br || br.state < 0) continue;
    const L = br.inductance;
    const s = br.state;
    at(s, s, -br.resistance / L);
    at(s, br.into, -1 / L);
    if (br.into > 0) at(s, br.into - 1, 1 / L);
    else B[s] = 1 / L; // choke input: driven by the rectifier output voltage
  }
  let coupling = 0;
  if (capacitorInput) B[0] = 1 / capacitance[0]!;
  else coupling = branchInto[0]!.state;
  return { capacitorInput, k, capacitance, meta, branchInto, n, coupling, A, B, idle, full, conductance };
}

/** In-place Gauss–Jordan inverse with partial pivoting (small dense matrices). */
export function invert(m: Float64Array, n: number): Float64Array {
  const a = Float64Array.from(m);
  const inv = new Float64Array(n * n);
  for (let i = 0; i < n; i++) inv[i * n + i] = 1;
  for (let col = 0; col < n; col++) {
    let p = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r * n + col]!) > Math.abs(a[p * n + col]!)) p = r;
    const pv = a[p * n + col]!;
    if (!(Math.abs(pv) > 1e-300)) throw new CalcError('no-solution', 'The supply network matrix is singular.');
    if (p !== col) {
      for (let c = 0; c < n; c++) {
        let t = a[p * n + c]!;
        a[p * n + c] = a[col * n + c]!;
        a[col * n + c] = t;
        t = inv[p * n + c]!;
        inv[p * n + c] = inv[col * n + c]!;
        inv[col * n + c] = t;
      }
    }
    const ip = 1 / pv;
    for (let c = 0; c < n; c++) {
      a[col * n + c]! *= ip;
      inv[col * n + c]! *= ip;
    }
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const f = a[r * n + col]!;
      if (f === 0) continue;
      for (let c = 0; c < n; c++) {
        a[r * n + c]! -= f * a[col * n + c]!;
        inv[r * n + c]! -= f * inv[col * n + c]!;
      }
    }
  }
  return inv;
}

/** Solves M·x = b in place of b (Gaussian elimination with partial pivoting); M is copied. */
export function solveLinear(m: Float64Array, b: Float64Array, n: number): Float64Array {
  const a = Float64Array.from(m);
  const x = Float64Array.from(b);
  for (let col = 0; col < n; col++) {
    let p = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r * n + col]!) > Math.abs(a[p * n + col]!)) p = r;
    const pv = a[p * n + col]!;
    if (!(Math.abs(pv) > 1e-300)) throw new CalcError('no-solution', 'The steady-state Newton matrix is singular.');
    if (p !== col) {
      for (let c = 0; c < n; c++) {
        const t = a[p * n + c]!;
        a[p * n + c] = a[col * n + c]!;
        a[col * n + c] = t;
      }
      const t = x[p]!;
      x[p] = x[col]!;
      x[col] = t;
    }
    for (let r = col + 1; r < n; r++) {
      const f = a[r * n + col]! / pv;
      if (f === 0) continue;
      for (let c = col; c < n; c++) a[r * n + c]! -= f * a[col * n + c]!;
      x[r]! -= f * x[col]!;
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = x[r]!;
    for (let c = r + 1; c < n; c++) s -= a[r * n + c]! * x[c]!;
    x[r] = s / a[r * n + r]!;
  }
  return x;
}

export type Discretisation = { h: number; Ad: Float64Array; Minv: Float64Array; md: Float64Array };

export function discretise(net: Network, h: number): Discretisation {
  const { n, A, B } = net;
  const M = new Float64Array(n * n);
  const P = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    M[i] = -0.5 * h * A[i]!;
    P[i] = 0.5 * h * A[i]!;
  }
  for (let i = 0; i < n; i++) {
    M[i * n + i]! += 1;
    P[i * n + i]! += 1;
  }
  const Minv = invert(M, n);
  const Ad = new Float64Array(n * n);
  for (let r = 0; r < n; r++)
    for (let c = 0; c < n; c++) {
      let s = 0;
      for (let q = 0; q < n; q++) s += Minv[r * n + q]! * P[q * n + c]!;
      Ad[r * n + c] = s;
    }
  const md = new Float64Array(n);
  for (let r = 0; r < n; r++) {
    let s = 0;
    for (let q = 0; q < n; q++) s += Minv[r * n + q]! * B[q]!;
    md[r] = 0.5 * h * s;
  }
  return { h, Ad, Minv, md };
}

/** bd = h·M⁻¹·b for the load currents `currents` (A per node). */
export function loadTerm(net: Network, d: Discretisation, currents: number[]): Float64Array {
  const { n, k, capacitance } = net;
  const b = new Float64Array(n);
  for (let j = 0; j < k; j++) b[j] = -currents[j]! / capacitance[j]!;
  const bd = new Float64Array(n);
  for (let r = 0; r < n; r++) {
    let s = 0;
    for (let q = 0; q < k; q++) s += d.Minv[r * n + q]! * b[q]!;
    bd[r] = d.h * s;
  }
  return bd;
}
