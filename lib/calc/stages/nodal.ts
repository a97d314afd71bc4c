import { modelEvaluations, type TubeModel } from '../models/registry';
import { solveDenseInPlace } from './newton';

/**
 * Triodes in a resistive network, solved by Newton on the node voltages (modified nodal analysis with every
 * source a fixed node). Used by the phase splitters, whose two outputs and shared cathode circuits do not fit the
 * one-tube network of network.ts.
 *
 * A node reference is an unknown node index (≥ 0) or a fixed node: −(slot + 1), whose voltage the caller sets in
 * `fixed[slot]` before each solve (supplies, ground, the drive, capacitor-held voltages).
 */
export type NodeRef = number;
export const fixedRef = (slot: number): NodeRef => -(slot + 1);

export type NodalTube = { model: TubeModel; p: NodeRef; g: NodeRef; k: NodeRef };

export type NodalSpec = {
  /** number of unknown nodes (≤ 8) */
  n: number;
  /** number of fixed slots */
  slots: number;
  resistors: Array<{ a: NodeRef; b: NodeRef; r: number }>;
  /** constant currents into a node (A; an ideal tail source is a negative one at the cathode) */
  currents: Array<{ node: NodeRef; i: number }>;
  tubes: NodalTube[];
};

export type NodalCircuit = {
  spec: NodalSpec;
  n: number;
  fixed: Float64Array;
  /** conductance matrix between unknown nodes, row-major */
  g: Float64Array;
  /** couplings of unknown nodes to fixed slots: node, slot, conductance */
  links: Array<[number, number, number]>;
  inject: Float64Array;
  tubes: NodalTube[];
};

export function compileNodal(spec: NodalSpec): NodalCircuit {
  const n = spec.n;
  const g = new Float64Array(n * n);
  const links: Array<[number, number, number]> = [];
  for (const { a, b, r } of spec.resistors) {
    if (!(r > 0)) throw new Error('nodal: resistor must be positive');
    const c = 1 / r;
    if (a >= 0) g[a * n + a] = (g[a * n + a] as number) + c;
    if (b >= 0) g[b * n + b] = (g[b * n + b] as number) + c;
    if (a >= 0 && b >= 0) {
      g[a * n + b] = (g[a * n + b] as number) - c;
      g[b * n + a] = (g[b * n + a] as number) - c;
    }
    if (a >= 0 && b < 0) links.push([a, -b - 1, c]);
    if (b >= 0 && a < 0) links.push([b, -a - 1, c]);
  }
  const inject = new Float64Array(n);
  for (const { node, i } of spec.currents) if (node >= 0) inject[node] = (inject[node] as number) + i;
  return { spec, n, fixed: new Float64Array(spec.slots), g, links, inject, tubes: spec.tubes };
}

/** The solved state: node voltages and each tube's plate and grid current. */
export type NodalState = { v: Float64Array; ia: Float64Array; ig: Float64Array };

export function newNodalState(c: NodalCircuit): NodalState {
  return { v: new Float64Array(c.n), ia: new Float64Array(c.tubes.length), ig: new Float64Array(c.tubes.length) };
}

export function copyState(s: NodalState): NodalState {
  return { v: s.v.slice(), ia: s.ia.slice(), ig: s.ig.slice() };
}

export const voltageOf = (c: NodalCircuit, s: NodalState, ref: NodeRef): number =>
  ref >= 0 ? (s.v[ref] as number) : (c.fixed[-ref - 1] as number);

// scratch (the engine is synchronous; no allocation per sample)
const J = new Float64Array(64);
const F = new Float64Array(8);
const V = new Float64Array(8);
const PV = new Float64Array(8);
const DV = new Float64Array(8);
const PD = new Float64Array(4);
const GD = new Float64Array(2);
/** per tube: ∂ia/∂vak, ∂ia/∂vgk, ∂ig/∂vgk at the last evaluation (for the final linear update of the currents) */
const TD = new Float64Array(3 * 8);

function stampRow(n: number, tube: NodalTube, row: NodeRef, sign: number, dp: number, dg: number, dk: number): void {
  if (row < 0) return;
  if (tube.p >= 0) J[row * n + tube.p] = (J[row * n + tube.p] as number) + sign * dp;
  if (tube.g >= 0) J[row * n + tube.g] = (J[row * n + tube.g] as number) + sign * dg;
  if (tube.k >= 0) J[row * n + tube.k] = (J[row * n + tube.k] as number) + sign * dk;
}

/** Residual F(V) (currents leaving each unknown node) and, with `jac`, its Jacobian into J. */
function residual(c: NodalCircuit, v: Float64Array, out: NodalState | null, jac: boolean): number {
  const n = c.n;
  const g = c.g;
  for (let i = 0; i < n; i++) {
    let s = -(c.inject[i] as number);
    for (let j = 0; j < n; j++) s += (g[i * n + j] as number) * (v[j] as number);
    F[i] = s;
  }
  if (jac) for (let i = 0; i < n * n; i++) J[i] = g[i] as number;
  for (let l = 0; l < c.links.length; l++) {
    const link = c.links[l] as [number, number, number];
    F[link[0]] = (F[link[0]] as number) - link[2] * (c.fixed[link[1]] as number);
  }
  const fixed = c.fixed;
  for (let t = 0; t < c.tubes.length; t++) {
    const tube = c.tubes[t] as NodalTube;
    const vp = tube.p >= 0 ? (v[tube.p] as number) : (fixed[-tube.p - 1] as number);
    const vg = tube.g >= 0 ? (v[tube.g] as number) : (fixed[-tube.g - 1] as number);
    const vk = tube.k >= 0 ? (v[tube.k] as number) : (fixed[-tube.k - 1] as number);
    const vgk = vg - vk;
    const pD = tube.model.plateCurrentD as NonNullable<TubeModel['plateCurrentD']>;
    const ia = pD(vp - vk, vgk, 0, PD);
    let ig = 0;
    if (vgk > 0) ig = (tube.model.gridCurrentD as NonNullable<TubeModel['gridCurrentD']>)(vgk, GD);
    else GD[1] = 0;
    if (out) {
      out.ia[t] = ia;
      out.ig[t] = ig;
    }
    if (tube.p >= 0) F[tube.p] = (F[tube.p] as number) + ia;
    if (tube.g >= 0) F[tube.g] = (F[tube.g] as number) + ig;
    if (tube.k >= 0) F[tube.k] = (F[tube.k] as number) - ia - ig;
    TD[3 * t] = PD[1] as number;
    TD[3 * t + 1] = PD[2] as number;
    TD[3 * t + 2] = GD[1] as number;
    if (jac) {
      const ga = PD[1] as number;
      const gm = PD[2] as number;
      const gg = GD[1] as number;
      // d(ia)/d(vp, vg, vk) = (ga, gm, −ga − gm); d(ig)/d(vg, vk) = (gg, −gg)
      stampRow(n, tube, tube.p, 1, ga, gm, -ga - gm);
      stampRow(n, tube, tube.g, 1, 0, gg, -gg);
      stampRow(n, tube, tube.k, -1, ga, gm + gg, -ga - gm - gg);
    }
  }
  let norm = 0;
  for (let i = 0; i < n; i++) norm += Math.abs(F[i] as number);
  return norm;
}

/**
 * Newton on the node voltages from `start` (a nearby solved state, or a rough guess for the DC point), with
 * step halving on the residual norm and each step limited to `maxStep` volts per node. Converged when the Newton
 * step is below `tol` of each node voltage (at least 1 V): the step is taken and the error left is ~ its square. Writes the result into
 * `out` and returns true; false when it does not converge.
 */
export function solveNodal(c: NodalCircuit, start: Float64Array, out: NodalState, maxStep = 50, maxIter = 60, tol = 1e-9): boolean {
  const n = c.n;
  for (let i = 0; i < n; i++) V[i] = start[i] as number;
  let norm = residual(c, V, out, true);
  for (let iter = 0; iter < maxIter; iter++) {
    for (let i = 0; i < n; i++) DV[i] = -(F[i] as number);
    if (!solveDenseInPlace(n, J, DV)) return false;
    let biggest = 0;
    let small = true;
    for (let i = 0; i < n; i++) {
      const d = Math.abs(DV[i] as number);
      biggest = Math.max(biggest, d);
      if (d > tol * Math.max(1, Math.abs(V[i] as number))) small = false;
    }
    if (small) {
      // converged: after this step the error is ~ its square; the currents follow the step linearly
      for (let i = 0; i < n; i++) out.v[i] = (V[i] as number) + (DV[i] as number);
      for (let t = 0; t < c.tubes.length; t++) {
        const tube = c.tubes[t] as NodalTube;
        const dp = tube.p >= 0 ? (DV[tube.p] as number) : 0;
        const dg = tube.g >= 0 ? (DV[tube.g] as number) : 0;
        const dk = tube.k >= 0 ? (DV[tube.k] as number) : 0;
        out.ia[t] = (out.ia[t] as number) + (TD[3 * t] as number) * (dp - dk) + (TD[3 * t + 1] as number) * (dg - dk);
        out.ig[t] = (out.ig[t] as number) + (TD[3 * t + 2] as number) * (dg - dk);
      }
      return true;
    }
    const limit = biggest > maxStep ? maxStep / biggest : 1;
    for (let i = 0; i < n; i++) PV[i] = V[i] as number;
    let lambda = limit;
    let accepted = false;
    for (let h = 0; h < 12; h++) {
      for (let i = 0; i < n; i++) V[i] = (PV[i] as number) + lambda * (DV[i] as number);
      const nNorm = residual(c, V, out, true);
      if (Number.isFinite(nNorm) && (nNorm <= norm || h === 11)) {
        norm = nNorm;
        accepted = true;
        break;
      }
      lambda *= 0.5;
    }
    if (!accepted) return false;
  }
  modelEvaluations.newtonFallbacks++;
  return false;
}
