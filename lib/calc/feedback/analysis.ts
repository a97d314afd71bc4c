// Global negative feedback on a solved chain: loop gain by double injection, margins, closed- and open-loop
// figures, and the nonlinear closed loop in the time domain (pure).
//
// Loop gain. The loop is broken at RBRK (speaker → feedback tap). In the linearised circuit RBRK is replaced by
// an ideal voltage source between the speaker node a and the tap b (one more unknown, its current). Two
// injections give Tv = −V(a)/V(b) (series voltage) and Ti = −Ia/Ib (shunt current into b; Ia from the
// amplifier, Ib into the feedback network), and T = (Tv·Ti − 1)/(Tv + Ti + 2) (Middlebrook's double injection),
// which is exact whatever the impedances on either side of the break. The same factorised matrix, with the
// source at 0 V, gives the closed-loop transfer and output impedance; holding V(b) at 0 by superposition gives
// the open-loop ones (the feedback resistor returned to signal ground, its loading kept).
import type { ChainInput } from '../chain/input';
import { linearise, type Compiled, type Linearised } from '../chain/mna';
import { prepareChain, solveLevel, type LevelPoint, type PreparedChain } from '../chain/solve';
import { CalcError } from '../errors';
import { logFrequencies } from '../transformer';
import { BREAK_RESISTANCE, FEEDBACK_NODES, type FeedbackBuild, type FeedbackSpec } from './circuit';
import { bandwidth, loopStability, responsePeak, squareWaveResponse, unwrapFrom, type Complex, type LoopPoint, type SquareWave, type Stability } from './stability';

type Term = number;

/** Complex system of the linearised chain at one frequency, factorised, with the break-point source row. */
type Factored = { n: number; re: Float64Array; im: Float64Array; perm: Int32Array };

function factor(m: number, re: Float64Array, im: Float64Array, perm: Int32Array): boolean {
  for (let i = 0; i < m; i++) perm[i] = i;
  for (let c = 0; c < m; c++) {
    let p = c;
    let best = Math.hypot(re[c * m + c] as number, im[c * m + c] as number);
    for (let r = c + 1; r < m; r++) {
      const v = Math.hypot(re[r * m + c] as number, im[r * m + c] as number);
      if (v > best) {
        best = v;
        p = r;
      }
    }
    if (!(best > 0)) return false;
    if (p !== c) {
      for (let k = 0; k < m; k++) {
        const a = re[c * m + k] as number;
        re[c * m + k] = re[p * m + k] as number;
        re[p * m + k] = a;
        const b = im[c * m + k] as number;
        im[c * m + k] = im[p * m + k] as number;
        im[p * m + k] = b;
      }
      const t = perm[c] as number;
      perm[c] = perm[p] as number;
      perm[p] = t;
    }
    const dr = re[c * m + c] as number;
    const di = im[c * m + c] as number;
    const dd = dr * dr + di * di;
    for (let r = c + 1; r < m; r++) {
      const ar = re[r * m + c] as number;
      const ai = im[r * m + c] as number;
      if (ar === 0 && ai === 0) continue;
      // l = a / d
      const lr = (ar * dr + ai * di) / dd;
      const li = (ai * dr - ar * di) / dd;
      re[r * m + c] = lr;
      im[r * m + c] = li;
      for (let k = c + 1; k < m; k++) {
        const ur = re[c * m + k] as number;
        const ui = im[c * m + k] as number;
        if (ur === 0 && ui === 0) continue;
        re[r * m + k] = (re[r * m + k] as number) - (lr * ur - li * ui);
        im[r * m + k] = (im[r * m + k] as number) - (lr * ui + li * ur);
      }
    }
  }
  return true;
}

/** Solves in place: b (re, im); `xr`, `xi` are scratch of the same length. */
function solve(f: Factored, bRe: Float64Array, bIm: Float64Array, xr: Float64Array, xi: Float64Array): void {
  const { n: m, re, im, perm } = f;
  for (let i = 0; i < m; i++) {
    xr[i] = bRe[perm[i] as number] as number;
    xi[i] = bIm[perm[i] as number] as number;
  }
  for (let i = 0; i < m; i++) {
    let sr = xr[i] as number;
    let si = xi[i] as number;
    for (let k = 0; k < i; k++) {
      const lr = re[i * m + k] as number;
      const li = im[i * m + k] as number;
      sr -= lr * (xr[k] as number) - li * (xi[k] as number);
      si -= lr * (xi[k] as number) + li * (xr[k] as number);
    }
    xr[i] = sr;
    xi[i] = si;
  }
  for (let i = m - 1; i >= 0; i--) {
    let sr = xr[i] as number;
    let si = xi[i] as number;
    for (let k = i + 1; k < m; k++) {
      const ur = re[i * m + k] as number;
      const ui = im[i * m + k] as number;
      sr -= ur * (xr[k] as number) - ui * (xi[k] as number);
      si -= ur * (xi[k] as number) + ui * (xr[k] as number);
    }
    const dr = re[i * m + i] as number;
    const di = im[i * m + i] as number;
    const dd = dr * dr + di * di;
    xr[i] = (sr * dr + si * di) / dd;
    xi[i] = (si * dr - sr * di) / dd;
  }
  bRe.set(xr);
  bIm.set(xi);
}

type Loop = {
  cp: Compiled;
  lin: Linearised;
  a: Term;
  b: Term;
  load: number;
  /** frequency-independent real part with RBRK replaced by the source branch (row/column n) */
  base: Float64Array;
  work: { re: Float64Array; im: Float64Array; perm: Int32Array; v: Float64Array[]; xr: Float64Array; xi: Float64Array; drvIm: Float64Array };
};

/** Everything the loop analysis reads at one frequency. */
export type LoopAt = {
  /** return ratio T */
  loop: Complex;
  closed: Complex;
  open: Complex;
  zClosed: Complex;
  zOpen: Complex;
};

export function systemAt(L: Loop, f: number): LoopAt {
  const { cp, lin, a, b } = L;
  const n = lin.n;
  const m = n + 1;
  const { re, im, perm, v, xr, xi, drvIm } = L.work;
  re.set(L.base);
  im.fill(0);
  drvIm.fill(0);
  const w = 2 * Math.PI * f;
  const fs = cp.fixedSignal;
  const stampB = (ta: Term, tb: Term, y: number) => {
    if (ta >= 0) im[ta * m + ta] = (im[ta * m + ta] as number) + y;
    if (tb >= 0) im[tb * m + tb] = (im[tb * m + tb] as number) + y;
    if (ta >= 0 && tb >= 0) {
      im[ta * m + tb] = (im[ta * m + tb] as number) - y;
      im[tb * m + ta] = (im[tb * m + ta] as number) - y;
    }
    // a capacitor or inductor on a signal source's node drives the network from it
    const du = (ta <= -2 ? (fs[-2 - ta] as number) : 0) - (tb <= -2 ? (fs[-2 - tb] as number) : 0);
    if (du !== 0) {
      if (ta >= 0) drvIm[ta] = (drvIm[ta] as number) - y * du;
      if (tb >= 0) drvIm[tb] = (drvIm[tb] as number) + y * du;
    }
  };
  for (const c of cp.caps) stampB(c.a, c.b, w * c.c);
  for (const l of cp.inds) stampB(l.a, l.b, -1 / (w * l.l));
  const s = n;
  if (!factor(m, re, im, perm)) throw new CalcError('no-solution', 'The small-signal circuit of the feedback loop is singular.');
  const F: Factored = { n: m, re, im, perm };
  const c = (x: Float64Array, y: Float64Array, i: number): Complex => ({ re: x[i] as number, im: y[i] as number });
  const [v1r, v1i, v2r, v2i, v3r, v3i, v4r, v4i] = v as [Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array];
  for (const x of v) x.fill(0);
  // 1: series voltage injection; 2: current injection into b; 3: the input signal with the source at 0 V (the
  // loop closed); 4: a test current into the speaker node (output impedance), loop closed
  v1r[s] = 1;
  v2r[b] = 1;
  for (let i = 0; i < n; i++) v3r[i] = lin.drive[i] as number;
  v3i.set(drvIm);
  v4r[a] = 1;
  solve(F, v1r, v1i, xr, xi);
  solve(F, v2r, v2i, xr, xi);
  solve(F, v3r, v3i, xr, xi);
  solve(F, v4r, v4i, xr, xi);
  const Va1 = c(v1r, v1i, a);
  const Vb1 = c(v1r, v1i, b);
  const tv = neg(div(Va1, Vb1));
  const ia = c(v2r, v2i, s);
  const ib = add(ia, { re: 1, im: 0 });
  const ti = neg(div(ia, ib));
  const loop = div(sub(mul(tv, ti), ONE), add(add(tv, ti), { re: 2, im: 0 }));
  const closed = c(v3r, v3i, a);
  // open loop: add k·(injection 1) so that V(b) = 0
  const k3 = neg(div(c(v3r, v3i, b), Vb1));
  const open = add(closed, mul(k3, Va1));
  const zc = c(v4r, v4i, a);
  const k4 = neg(div(c(v4r, v4i, b), Vb1));
  const zo = add(zc, mul(k4, Va1));
  // the speaker load is part of the circuit: take it away to leave the amplifier's own output impedance
  const yl = { re: 1 / L.load, im: 0 };
  return { loop, closed, open, zClosed: inv(sub(inv(zc), yl)), zOpen: inv(sub(inv(zo), yl)) };
}

const ONE: Complex = { re: 1, im: 0 };
const add = (x: Complex, y: Complex): Complex => ({ re: x.re + y.re, im: x.im + y.im });
const sub = (x: Complex, y: Complex): Complex => ({ re: x.re - y.re, im: x.im - y.im });
const neg = (x: Complex): Complex => ({ re: -x.re, im: -x.im });
const mul = (x: Complex, y: Complex): Complex => ({ re: x.re * y.re - x.im * y.im, im: x.re * y.im + x.im * y.re });
const div = (x: Complex, y: Complex): Complex => {
  const d = y.re * y.re + y.im * y.im;
  return { re: (x.re * y.re + x.im * y.im) / d, im: (x.im * y.re - x.re * y.im) / d };
};
const inv = (x: Complex) => div(ONE, x);
const abs = (x: Complex) => Math.hypot(x.re, x.im);
const db = (x: number) => 20 * Math.log10(Math.max(x, 1e-30));
const phaseDeg = (x: Complex) => (Math.atan2(x.im, x.re) * 180) / Math.PI;

export function loopOf(p: PreparedChain, lin: Linearised): Loop {
  const fb = p.chain.feedback!;
  const out = p.built.ports.find((x) => x.id === fb.from)!;
  const speaker = out.outputs.speaker!.node;
  const a = p.cp.index(speaker);
  const b = p.cp.index(FEEDBACK_NODES.tap);
  if (a < 0 || b < 0) throw new CalcError('invalid-input', 'Feedback: the speaker terminal is tied to a fixed voltage.');
  const n = lin.n;
  const m = n + 1;
  const base = new Float64Array(m * m);
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) base[i * m + k] = lin.g[i * n + k] as number;
  // take RBRK out, put the source branch in: unknown n is its current from a to b; V(b) − V(a) = vz
  const g = 1 / BREAK_RESISTANCE;
  base[a * m + a] = (base[a * m + a] as number) - g;
  base[b * m + b] = (base[b * m + b] as number) - g;
  base[a * m + b] = (base[a * m + b] as number) + g;
  base[b * m + a] = (base[b * m + a] as number) + g;
  base[a * m + n] = 1;
  base[b * m + n] = -1;
  base[n * m + b] = 1;
  base[n * m + a] = -1;
  const vec = () => new Float64Array(m);
  const work = { re: new Float64Array(m * m), im: new Float64Array(m * m), perm: new Int32Array(m), v: Array.from({ length: 8 }, vec), xr: vec(), xi: vec(), drvIm: vec() };
  return { cp: p.cp, lin, a, b, load: out.power!.load, base, work };
}

export type FeedbackPlan = {
  /** the chain as the main analysis solves it (polarity resolved; loop opened when it is positive feedback) */
  chain: ChainInput;
  prepared: PreparedChain;
  polarity: 'normal' | 'reversed';
  polarityChosen: boolean;
  positiveFeedback: boolean;
  /** the closed circuit with the polarity as entered, when that is positive feedback (for the loop-gain plot) */
  positive: PreparedChain | null;
};

const withFeedback = (chain: ChainInput, fb: FeedbackBuild): ChainInput => ({ ...chain, feedback: fb as FeedbackSpec });

/**
 * The same prepared circuit with the feedback taken from the other secondary terminal: every ideal transformer of
 * the output stage changes sign. The operating point is unchanged (the transformer passes no DC; the speaker's
 * microvolt offset only changes sign), so the solved DC point is kept.
 */
function reversedSecondary(p: PreparedChain, from: string, chain: ChainInput): PreparedChain {
  const names = p.cp.circuit.transformers.map((t) => t.name.endsWith(`_${from}`));
  const cp: Compiled = { ...p.cp, xfmr: p.cp.xfmr.map((t, i) => (names[i] ? { ...t, ratio: -t.ratio } : t)) };
  return { ...p, chain, cp };
}

/**
 * The loop opened for the figures "without feedback": the break resistor now returns the tap to ground instead of
 * the speaker (the first stage keeps the loading of Rf and Rsh). The DC point is unchanged (both ends sit at 0 V).
 */
export function openLoop(p: PreparedChain): PreparedChain {
  const k = p.cp.circuit.resistors.findIndex((r) => r.name === 'RBRK_FB');
  const tap = p.cp.index(FEEDBACK_NODES.tap);
  const res = p.cp.res.map((r, i) => (i === k ? { a: -1 as Term, b: tap, g: r.g } : r));
  return { ...p, cp: { ...p.cp, res } };
}

/** Resolves 'auto' polarity and detects positive feedback before the chain is solved with the loop closed. */
export function planFeedback(chain: ChainInput): FeedbackPlan {
  const fb = chain.feedback!;
  const first: FeedbackBuild = { ...fb, polarity: fb.polarity === 'reversed' ? 'reversed' : 'normal' };
  const p1 = prepareChain(withFeedback(chain, first));
  const t = systemAt(loopOf(p1, linearise(p1.cp, p1.dc)), 1000).loop;
  const positive = t.re < 0;
  if (!positive) return { chain: p1.chain, prepared: p1, polarity: first.polarity as 'normal' | 'reversed', polarityChosen: fb.polarity === 'auto', positiveFeedback: false, positive: null };
  if (fb.polarity === 'auto') {
    const other = first.polarity === 'normal' ? 'reversed' : 'normal';
    const p2 = reversedSecondary(p1, fb.from, withFeedback(chain, { ...fb, polarity: other }));
    return { chain: p2.chain, prepared: p2, polarity: other, polarityChosen: true, positiveFeedback: false, positive: null };
  }
  // as entered it is positive feedback: the main analysis runs with the loop open, and says so
  return { chain: p1.chain, prepared: openLoop(p1), polarity: first.polarity as 'normal' | 'reversed', polarityChosen: false, positiveFeedback: true, positive: p1 };
}

export type ResponseRow = { frequency: number; magnitudeDb: number; phaseDeg: number };

export type FeedbackResult = {
  from: string;
  to: string;
  polarity: 'normal' | 'reversed';
  /** the engine chose the secondary connection ('auto') */
  polarityChosen: boolean;
  /** β of the divider alone, Rsh/(Rsh + Rf) (the handbook feedback factor) */
  feedbackFactor: number;
  /** return ratio at 1 kHz: magnitude (V/V), dB and phase */
  loopGain: number;
  loopGainDb: number;
  loopGainPhaseDeg: number;
  /** speaker volts per volt at the input, 1 kHz */
  openLoopGain: number;
  closedLoopGain: number;
  /** open over closed, dB (the "amount of feedback") */
  feedbackDb: number;
  outputImpedance: { open: number; closed: number };
  dampingFactor: { open: number; closed: number };
  /** smallest closed-loop damping factor over 20 Hz – 20 kHz */
  minDampingFactor: { frequency: number; value: number };
  /** THD at the speaker at the same output level, time-domain solves of the whole circuit */
  distortion: {
    outputAmplitude: number;
    outputPower: number | null;
    closed: { inputAmplitude: number; thdPercent: number } | null;
    open: { inputAmplitude: number; thdPercent: number };
  };
  bandwidth: { open: { low: number | null; high: number | null }; closed: { low: number | null; high: number | null } };
  phaseMargin: number | null;
  gainMargin: number | null;
  stability: Stability;
  closedLoopPeak: { frequency: number; db: number };
  loopResponse: LoopPoint[];
  closedResponse: ResponseRow[];
  openResponse: ResponseRow[];
  squareWaves: SquareWave[];
  warnings: string[];
};

const row = (f: number, x: Complex): ResponseRow => ({ frequency: f, magnitudeDb: db(abs(x)), phaseDeg: phaseDeg(x) });

export type FeedbackOptions = { perDecade?: number };

/**
 * The feedback figures. `main` is the closed-loop level already solved by the chain analysis (null when the loop
 * had to stay open), `p` its prepared circuit.
 */
export function analyzeFeedback(plan: FeedbackPlan, main: LevelPoint | null, options: FeedbackOptions = {}): FeedbackResult {
  const chain = plan.chain;
  const fb = chain.feedback!;
  const loopCircuit = plan.positive ?? plan.prepared;
  const L = loopOf(loopCircuit, linearise(loopCircuit.cp, loopCircuit.dc));
  const freqs = logFrequencies(1, 1e6, options.perDecade ?? 20);
  const cache = new Map<number, LoopAt>();
  const at = (f: number) => {
    let r = cache.get(f);
    if (!r) {
      r = systemAt(L, f);
      cache.set(f, r);
    }
    return r;
  };
  const pts = freqs.map(at);
  const loop = pts.map((x) => x.loop);
  const stability = loopStability(freqs, loop, (f) => at(f).loop);
  const k = at(1000);
  const warnings: string[] = [];
  const closedArr = pts.map((x) => x.closed);
  const openArr = pts.map((x) => x.open);
  const bwClosed = bandwidth(freqs, closedArr, (f) => at(f).closed);
  const bwOpen = bandwidth(freqs, openArr, (f) => at(f).open);
  let minDf = { frequency: 1000, value: L.load / abs(k.zClosed) };
  pts.forEach((x, i) => {
    const f = freqs[i] as number;
    if (f >= 20 && f <= 20000) {
      const v = L.load / abs(x.zClosed);
      if (v < minDf.value) minDf = { frequency: f, value: v };
    }
  });
  // square waves from the sampled closed-loop response (log-interpolated magnitude and phase between samples)
  const interp = (f: number): Complex => {
    if (f <= (freqs[0] as number)) return closedArr[0] as Complex;
    if (f >= (freqs[freqs.length - 1] as number)) return closedArr[closedArr.length - 1] as Complex;
    const x = (Math.log10(f) - Math.log10(freqs[0] as number)) * (options.perDecade ?? 20);
    const i = Math.floor(x);
    const t = x - i;
    const p = closedArr[i] as Complex;
    const q = closedArr[i + 1] as Complex;
    const ratio = div(q, p);
    const lm = Math.log(abs(ratio));
    const ph = Math.atan2(ratio.im, ratio.re);
    const m = Math.exp(t * lm);
    return mul(p, { re: m * Math.cos(t * ph), im: m * Math.sin(t * ph) });
  };
  const squareWaves = plan.positiveFeedback ? [] : [squareWaveResponse(interp, 1000), squareWaveResponse(interp, 10000)];

  // time domain: closed loop (the main solve) and open loop at the same output level
  const amplitude = chain.input.amplitude;
  const frequency = chain.input.frequency;
  const pOpen = plan.positiveFeedback ? plan.prepared : openLoop(plan.prepared);
  let closed: FeedbackResult['distortion']['closed'] = null;
  let target = 0;
  let power: number | null = null;
  if (main && !plan.positiveFeedback) {
    closed = { inputAmplitude: amplitude, thdPercent: main.output.thdPercent };
    target = main.output.amplitude;
    power = main.output.power;
  }
  let open: FeedbackResult['distortion']['open'] = { inputAmplitude: 0, thdPercent: 0 };
  if (amplitude > 0) {
    if (!closed) {
      const o = solveLevel(pOpen, amplitude, frequency);
      target = o.output.amplitude;
      power = o.output.power;
      open = { inputAmplitude: amplitude, thdPercent: o.output.thdPercent };
    } else {
      // the input for the same fundamental at the speaker: the small-signal ratio first, then secant steps while it
      // is more than 0.5 % off (the open loop compresses a little). 64 samples a cycle: harmonics to the 10th.
      const SAMPLES = 64;
      let x0 = (amplitude * abs(k.closed)) / abs(k.open);
      let o0 = solveLevel(pOpen, x0, frequency, undefined, SAMPLES);
      let x1 = x0;
      let o1 = o0;
      if (Math.abs(o0.output.amplitude / target - 1) > 5e-3) {
        x1 = x0 * (target / Math.max(o0.output.amplitude, 1e-12));
        o1 = solveLevel(pOpen, x1, frequency, o0.cycle.start, SAMPLES);
      }
      for (let it = 0; it < 3 && Math.abs(o1.output.amplitude / target - 1) > 5e-3; it++) {
        const slope = (o1.output.amplitude - o0.output.amplitude) / (x1 - x0);
        const x2 = slope > 0 ? x1 + (target - o1.output.amplitude) / slope : x1 * (target / o1.output.amplitude);
        x0 = x1;
        o0 = o1;
        x1 = x2;
        o1 = solveLevel(pOpen, x1, frequency, o0.cycle.start, SAMPLES);
      }
      open = { inputAmplitude: x1, thdPercent: o1.output.thdPercent };
    }
  }
  if (plan.positiveFeedback) {
    warnings.push('The feedback as connected is positive: the figures with the loop closed are not given, and the chain is shown with the loop open.');
  } else if (stability.verdict === 'will-oscillate') {
    warnings.push('The loop will oscillate: the closed-loop levels and distortion are those of a steady state the real amplifier will not settle into.');
  }
  if (plan.polarityChosen) {
    warnings.push(
      plan.polarity === 'normal'
        ? 'Feedback taken from the secondary terminal in phase with the first output plate (chosen for negative feedback).'
        : 'Feedback taken from the secondary terminal in antiphase with the first output plate (the secondary is reversed for negative feedback).',
    );
  }
  const ref = freqs.reduce((best, f, i) => (Math.abs(Math.log(f / 1000)) < Math.abs(Math.log((freqs[best] as number) / 1000)) ? i : best), 0);
  const unwrapped = unwrapFrom(loop, ref);
  const zOpen = abs(k.zOpen);
  const zClosed = abs(k.zClosed);
  return {
    from: fb.from,
    to: fb.to,
    polarity: plan.polarity,
    polarityChosen: plan.polarityChosen,
    feedbackFactor: fb.shuntResistor / (fb.shuntResistor + fb.resistor),
    loopGain: abs(k.loop),
    loopGainDb: db(abs(k.loop)),
    loopGainPhaseDeg: phaseDeg(k.loop),
    openLoopGain: abs(k.open),
    closedLoopGain: abs(k.closed),
    feedbackDb: db(abs(k.open) / abs(k.closed)),
    outputImpedance: { open: zOpen, closed: zClosed },
    dampingFactor: { open: L.load / zOpen, closed: L.load / zClosed },
    minDampingFactor: minDf,
    distortion: { outputAmplitude: target, outputPower: power, closed, open },
    bandwidth: { open: bwOpen, closed: bwClosed },
    phaseMargin: stability.phaseMargin,
    gainMargin: stability.gainMargin,
    stability,
    closedLoopPeak: responsePeak(freqs, closedArr),
    loopResponse: freqs.map((f, i) => ({ frequency: f, magnitudeDb: db(abs(loop[i] as Complex)), phaseDeg: unwrapped[i] as number })),
    closedResponse: freqs.map((f, i) => row(f, closedArr[i] as Complex)),
    openResponse: freqs.map((f, i) => row(f, openArr[i] as Complex)),
    squareWaves,
    warnings,
  };
}
