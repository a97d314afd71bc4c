// The rectifier as one implicit scalar per time step, the rectified half cycle, and the periodic steady state
// found by Newton's method on the half-cycle map (shooting) with exact step sensitivities.
import { CalcError } from '../errors';
import type { Discretisation, Network } from './network';
import { solveLinear } from './network';

/**
 * Drop law of one conducting path. Silicon: `junctions` diodes in series, each I = IS·(exp(w/(N·Vt)) − 1) plus
 * its ohmic RS. Vacuum: one plate, I = k·w^p (w > 0).
 */
export type DropLaw =
  | { kind: 'diode'; is: number; nvt: number; rs: number; junctions: number }
  | { kind: 'vacuum'; k: number; p: number };

/** Voltage drop of the path (rectifier only, no winding) at current i ≥ 0. */
export function pathDrop(law: DropLaw, i: number): number {
  if (!(i > 0)) return 0;
  if (law.kind === 'diode') return law.junctions * (law.nvt * Math.log1p(i / law.is) + law.rs * i);
  return Math.pow(i / law.k, 1 / law.p);
}

/** d(drop)/di */
export function pathDropSlope(law: DropLaw, i: number): number {
  if (law.kind === 'diode') return law.junctions * (law.nvt / (law.is + Math.max(i, 0)) + law.rs);
  if (!(i > 0)) return Infinity;
  return Math.pow(i / law.k, 1 / law.p) / (law.p * i);
}

export type Conduction = { i: number; didc: number; w: number };

/**
 * Current i ≥ 0 with c0 = R·i + drop(i) (c0: driving voltage, R: every linear resistance of the loop). Solved on
 * the junction / plate voltage w with bracketed Newton; `guess` warm-starts it. di/dc0 is returned for the
 * step sensitivities.
 */
export function conduct(law: DropLaw, c0: number, R: number, guess: number, out: Conduction): void {
  if (!(c0 > 0)) {
    out.i = 0;
    out.didc = 0;
    out.w = 0;
    return;
  }
  if (law.kind === 'diode') {
    const nj = law.junctions;
    const Rt = R + nj * law.rs;
    const { is, nvt } = law;
    let lo = 0;
    let hi = c0 / nj;
    // upper bound also from the resistance: i ≤ c0/Rt → w ≤ nvt·ln(1 + c0/(Rt·is))
    if (Rt > 0) hi = Math.min(hi, nvt * Math.log1p(c0 / (Rt * is)));
    let w = guess > lo && guess < hi ? guess : 0.5 * (lo + hi);
    for (let it = 0; it < 100; it++) {
      const ex = Math.exp(w / nvt);
      const cur = is * (ex - 1);
      const f = c0 - Rt * cur - nj * w;
      if (f > 0) lo = w;
      else hi = w;
      const df = -Rt * (is / nvt) * ex - nj;
      let wn = w - f / df;
      if (!(wn > lo && wn < hi)) wn = 0.5 * (lo + hi);
      if (Math.abs(wn - w) < 1e-13 * (1 + Math.abs(w))) {
        w = wn;
        break;
      }
      w = wn;
      if (hi - lo < 1e-14) break;
    }
    const i = is * Math.expm1(w / nvt);
    out.i = i;
    out.w = w;
    out.didc = 1 / (Rt + nj * (nvt / (is + i)));
    return;
  }
  const { k, p } = law;
  let lo = 0;
  let hi = c0;
  let w = guess > lo && guess < hi ? guess : 0.5 * c0;
  for (let it = 0; it < 100; it++) {
    const wp = Math.pow(w, p);
    const f = c0 - R * k * wp - w;
    if (f > 0) lo = w;
    else hi = w;
    const df = -R * k * p * (w > 0 ? wp / w : 0) - 1;
    let wn = w - f / df;
    if (!(wn > lo && wn < hi)) wn = 0.5 * (lo + hi);
    if (Math.abs(wn - w) < 1e-13 * (1 + w)) {
      w = wn;
      break;
    }
    w = wn;
    if (hi - lo < 1e-14) break;
  }
  const i = k * Math.pow(w, p);
  out.i = i;
  out.w = w;
  // dc0/di = R + dw/di, dw/di = 1/(k·p·w^(p−1))
  const dwdi = w > 0 ? 1 / (k * p * Math.pow(w, p - 1)) : Infinity;
  out.didc = Number.isFinite(dwdi) ? 1 / (R + dwdi) : 0;
}

export type Source = {
  /** peak of the voltage driving each conducting path (secondary, or each half) */
  peak: number;
  omega: number;
  /** source resistance of the path: winding + referred primary */
  resistance: number;
  law: DropLaw;
};

export type HalfCycleRecord = {
  /** node voltages, k × (N+1) */
  v: Float64Array[];
  /** rectifier output current, N+1 */
  ir: Float64Array;
  /** current into node 0's capacitor, N+1 */
  ic0: Float64Array;
};

/** One implicit step: from (x, u) at t to (x', u') at t+h; returns φ'(z) (du'/dz) for the sensitivities. */
function step(net: Network, d: Discretisation, bd: Float64Array, src: Source, x: Float64Array, u: number, e: number, pre: Float64Array, xOut: Float64Array, cond: Conduction, ws: { w: number }): { u: number; dudz: number; ir: number } {
  const { n } = net;
  const { Ad, md } = d;
  for (let r = 0; r < n; r++) {
    let s = bd[r]! + md[r]! * u;
    const row = r * n;
    for (let c = 0; c < n; c++) s += Ad[row + c]! * x[c]!;
    pre[r] = s;
  }
  const z = pre[net.coupling]!;
  const mu = md[net.coupling]!;
  let un: number;
  let dudz: number;
  let ir: number;
  if (net.capacitorInput) {
    // v0' = z + mu·i; e − v0' = Rs·i + drop(i)
    conduct(src.law, e - z, src.resistance + mu, ws.w, cond);
    un = cond.i;
    dudz = -cond.didc;
    ir = cond.i;
  } else {
    // i' = z + mu·u'; u' = e − Rs·i' − drop(i') while conducting
    conduct(src.law, e + z / mu, src.resistance + 1 / mu, ws.w, cond);
    if (cond.i > 0) {
      un = (cond.i - z) / mu;
      dudz = (cond.didc / mu - 1) / mu;
    } else {
      un = -z / mu;
      dudz = -1 / mu;
    }
    ir = cond.i;
  }
  if (cond.w > 0) ws.w = cond.w;
  for (let r = 0; r < n; r++) xOut[r] = pre[r]! + md[r]! * un;
  return { u: un, dudz, ir };
}

export type Workspace = {
  pre: Float64Array;
  xa: Float64Array;
  xb: Float64Array;
  S: Float64Array;
  S2: Float64Array;
  W: Float64Array;
  W2: Float64Array;
};

export function workspace(n: number): Workspace {
  const m = n + 1;
  return { pre: new Float64Array(n), xa: new Float64Array(n), xb: new Float64Array(n), S: new Float64Array(n * m), S2: new Float64Array(n * m), W: new Float64Array(m), W2: new Float64Array(m) };
}

/**
 * Integrates `halfCycles` rectified half cycles of N steps from y = (x, u), with |e| = peak·|sin(ωt + phase)|.
 * With `jacobian`, also returns d(y_end)/d(y_start) ((n+1)×(n+1), row-major). With `record`, fills the last
 * half cycle's samples.
 */
export function integrate(
  net: Network,
  d: Discretisation,
  bd: Float64Array,
  src: Source,
  steps: number,
  y0: Float64Array,
  opts: { jacobian?: boolean; record?: HalfCycleRecord; load0?: number; halfCycles?: number; phase?: number; maxTrack?: Float64Array; maxCurrent?: { value: number } },
  wsp: Workspace,
): { y: Float64Array; J: Float64Array | null } {
  const { n, k } = net;
  const m = n + 1;
  const { pre } = wsp;
  let x = wsp.xa;
  let xn = wsp.xb;
  for (let i = 0; i < n; i++) x[i] = y0[i]!;
  let u = y0[n]!;
  const jac = !!opts.jacobian;
  let S = wsp.S;
  let S2 = wsp.S2;
  let W = wsp.W;
  let W2 = wsp.W2;
  if (jac) {
    S.fill(0);
    W.fill(0);
    for (let i = 0; i < n; i++) S[i * m + i] = 1;
    W[n] = 1;
  }
  if (!net.capacitorInput) {
    // choke input: the rectifier voltage at the start follows from the state (it is not an unknown of its own):
    // conducting, the source minus the drops; not conducting, the choke's far end (no voltage across the choke)
    const e0 = src.peak * Math.abs(Math.sin(opts.phase ?? 0));
    const i0 = x[net.coupling]!;
    const br = net.branchInto[0]!;
    if (i0 > 0) {
      u = e0 - src.resistance * i0 - pathDrop(src.law, i0);
      if (jac) {
        W[n] = 0;
        W[net.coupling] = -(src.resistance + Math.min(pathDropSlope(src.law, i0), 1e12));
      }
    } else {
      u = x[0]! + br.resistance * Math.max(i0, 0);
      if (jac) {
        W[n] = 0;
        W[0] = 1;
      }
    }
  }
  const cond: Conduction = { i: 0, didc: 0, w: 0 };
  const ws = { w: 0 };
  const halfCycles = opts.halfCycles ?? 1;
  const phase = opts.phase ?? 0;
  const h = d.h;
  const rec = opts.record;
  const coupling = net.coupling;
  const { Ad, md } = d;
  const recordFrom = (halfCycles - 1) * steps;
  const total = halfCycles * steps;
  const irOf = (xx: Float64Array, uu: number) => (net.capacitorInput ? uu : xx[coupling]!);
  const nodeCurrent = (xx: Float64Array, ir: number) => {
    // current into the first capacitor: inflow − outflow
    let out = net.conductance[0]! * xx[0]!;
    const bout = net.branchInto[1];
    if (bout) out += bout.state >= 0 ? xx[bout.state]! : (xx[0]! - xx[1]!) / bout.resistance;
    return ir - out;
  };
  const load0 = opts.load0 ?? 0;
  const recordAt = (idx: number, xx: Float64Array, uu: number, loads: number) => {
    if (!rec) return;
    for (let j = 0; j < k; j++) rec.v[j]![idx] = xx[j]!;
    const ir = irOf(xx, uu);
    rec.ir[idx] = ir;
    rec.ic0[idx] = nodeCurrent(xx, ir) - loads;
  };
  if (rec && recordFrom === 0) recordAt(0, x, u, load0);
  for (let s = 0; s < total; s++) {
    const t = ((s + 1) % steps) * h;
    const e = src.peak * Math.abs(Math.sin(src.omega * t + phase));
    const r = step(net, d, bd, src, x, u, e, pre, xn, cond, ws);
    if (jac) {
      // dpre = Ad·S + md·W ; dz = dpre[coupling] ; W' = dudz·dz ; S' = dpre + md·W'
      for (let row = 0; row < n; row++) {
        const base = row * n;
        const mr = md[row]!;
        for (let col = 0; col < m; col++) {
          let sum = mr * W[col]!;
          for (let q = 0; q < n; q++) {
            const a = Ad[base + q]!;
            if (a !== 0) sum += a * S[q * m + col]!;
          }
          S2[row * m + col] = sum;
        }
      }
      const crow = coupling * m;
      for (let col = 0; col < m; col++) W2[col] = r.dudz * S2[crow + col]!;
      for (let row = 0; row < n; row++) {
        const mr = md[row]!;
        if (mr === 0) continue;
        for (let col = 0; col < m; col++) S2[row * m + col]! += mr * W2[col]!;
      }
      let t1 = S;
      S = S2;
      S2 = t1;
      t1 = W;
      W = W2;
      W2 = t1;
    }
    const tmp = x;
    x = xn;
    xn = tmp;
    u = r.u;
    if (opts.maxTrack) for (let j = 0; j < k; j++) if (x[j]! > opts.maxTrack[j]!) opts.maxTrack[j] = x[j]!;
    if (opts.maxCurrent && r.ir > opts.maxCurrent.value) opts.maxCurrent.value = r.ir;
    if (rec && s + 1 >= recordFrom) recordAt(s + 1 - recordFrom, x, u, load0);
  }
  const y = new Float64Array(m);
  for (let i = 0; i < n; i++) y[i] = x[i]!;
  y[n] = u;
  let J: Float64Array | null = null;
  if (jac) {
    J = new Float64Array(m * m);
    J.set(S.subarray(0, n * m), 0);
    J.set(W.subarray(0, m), n * m);
  }
  return { y, J };
}

export type SteadyState = { y: Float64Array; iterations: number; record: HalfCycleRecord };

export function newRecord(k: number, steps: number): HalfCycleRecord {
  return { v: Array.from({ length: k }, () => new Float64Array(steps + 1)), ir: new Float64Array(steps + 1), ic0: new Float64Array(steps + 1) };
}

/**
 * Periodic steady state of the rectified half cycle: Newton on y ↦ Φ(y) − y with the exact Jacobian of the
 * discrete map, with step halving when the residual grows.
 */
export function steadyState(net: Network, d: Discretisation, bd: Float64Array, src: Source, steps: number, guess: Float64Array, scale: Float64Array, wsp: Workspace, load0: number, fallback = true): SteadyState | null {
  const full = net.n + 1;
  // unknowns: the states, plus the rectifier current for a capacitor input (a choke input's start voltage follows from the states)
  const m = net.capacitorInput ? full : net.n;
  let y = Float64Array.from(guess);
  const record = newRecord(net.k, steps);
  const norm = (r: Float64Array) => {
    let mx = 0;
    for (let i = 0; i < m; i++) mx = Math.max(mx, Math.abs(r[i]!) / scale[i]!);
    return mx;
  };
  // relative to the secondary peak (≈ 50 µV on a 450 V supply)
  const TOL = 1e-7;
  // Newton with the exact Jacobian of the discrete map on the first pass; later passes reuse it (chord steps,
  // cheap: the map is nearly linear) until the residual stops falling fast, then it is refreshed.
  let J: Float64Array | null = null;
  let fresh = false;
  let run = integrate(net, d, bd, src, steps, y, { jacobian: true, record, load0 }, wsp);
  J = run.J;
  fresh = true;
  let r = new Float64Array(m);
  for (let i = 0; i < m; i++) r[i] = run.y[i]! - y[i]!;
  let rn = norm(r);
  let iterations = 1;
  for (; iterations <= 40; iterations++) {
    if (rn < TOL) return { y, iterations, record };
    const G = new Float64Array(m * m);
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) G[i * m + j] = J![i * full + j]!;
    for (let i = 0; i < m; i++) G[i * m + i]! -= 1;
    const neg = new Float64Array(m);
    for (let i = 0; i < m; i++) neg[i] = -r[i]!;
    let delta: Float64Array;
    try {
      delta = solveLinear(G, neg, m);
    } catch {
      break;
    }
    let lambda = 1;
    let accepted = false;
    for (let tries = 0; tries < 8; tries++) {
      const yt = Float64Array.from(y);
      for (let i = 0; i < m; i++) yt[i] = y[i]! + lambda * delta[i]!;
      // the rectifier cannot carry a negative current: keep a choke input's current on its physical side
      if (!net.capacitorInput && yt[net.coupling]! < 0) yt[net.coupling] = 0;
      const rt = integrate(net, d, bd, src, steps, yt, { record, load0 }, wsp);
      const rr = new Float64Array(m);
      for (let i = 0; i < m; i++) rr[i] = rt.y[i]! - yt[i]!;
      const rrn = norm(rr);
      if (rrn < rn || rrn < TOL) {
        const slow = rrn > 0.2 * rn;
        y = yt;
        run = rt;
        r = rr;
        if (rt.J) {
          J = rt.J;
          fresh = true;
        } else fresh = false;
        rn = rrn;
        accepted = true;
        if (slow && !rt.J && rrn >= TOL) {
          // refresh the Jacobian at the new point
          const again = integrate(net, d, bd, src, steps, y, { jacobian: true, record, load0 }, wsp);
          J = again.J;
          fresh = true;
          run = again;
        }
        break;
      }
      lambda *= 0.5;
    }
    if (!accepted) {
      if (fresh) break;
      const again = integrate(net, d, bd, src, steps, y, { jacobian: true, record, load0 }, wsp);
      J = again.J;
      fresh = true;
    }
  }
  if (rn < 1e-6) return { y, iterations, record };
  if (!fallback) return null;
  // Newton did not settle (e.g. a very lightly damped filter): fall back to plain integration over many cycles.
  for (let c = 0; c < 2000 && rn >= 1e-9; c++) {
    const next = integrate(net, d, bd, src, steps, y, { record, load0 }, wsp);
    for (let i = 0; i < m; i++) r[i] = next.y[i]! - y[i]!;
    rn = norm(r);
    y = Float64Array.from(next.y);
  }
  if (!(rn < 1e-6)) throw new CalcError('no-solution', 'The supply did not reach a steady state.');
  return { y, iterations: -1, record };
}
