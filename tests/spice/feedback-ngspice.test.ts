// Global negative feedback against ngspice on the same circuits (netlists written from the engine's own chain
// circuit, Koren subcircuits with their grid diodes, the output transformer as an ideal transformer with its
// magnetising and leakage inductances, winding capacitance and resistances).
// ngspice measures the loop gain by Middlebrook's double injection at the same break point (series voltage VZ,
// shunt current IZ), which needs no impedance relation at the break; the margins are then read from its samples.
// Acceptance limits (engineering judgement): loop gain and closed-loop gain 1 %, THD 5 % relative, −3 dB points
// 2 %, phase margin 2°, output impedance 2 %.
import { beforeAll, describe, expect, it } from 'vitest';
import { prepareChain, analyzeChain, type ChainResult } from '@/lib/calc/chain/solve';
import { planFeedback } from '@/lib/calc/feedback/analysis';
import { FEEDBACK_NODES } from '@/lib/calc/feedback/circuit';
import { loopStability, type Complex } from '@/lib/calc/feedback/stability';
import { logFrequencies } from '@/lib/calc/transformer';
import type { ChainInputRaw } from '@/lib/calc/chain/input';
import { feedbackNetlist } from './support/feedback-netlist';
import { parseChain, ppAmp, seAmp, seTriodeAmp } from './support/feedback-cases';
import { firstBelow, ngspice, requireNgspice } from './support/run-ngspice';

requireNgspice();

type Case = { name: string; raw: ChainInputRaw; oscillates?: boolean };
const cases: Case[] = [
  { name: 'single-ended pentode, plain resistor', raw: seAmp({ resistor: 10000, shuntResistor: 220 }) },
  { name: 'single-ended pentode, step network', raw: seAmp({ resistor: 4700, shuntResistor: 220, capacitor: 1e-9 }) },
  { name: 'single-ended triode, light feedback', raw: seTriodeAmp({ resistor: 1000, shuntResistor: 470 }) },
  { name: 'push-pull, plain resistor (rings)', raw: ppAmp({ resistor: 10000, shuntResistor: 100 }, 0.1) },
  { name: 'push-pull, step network', raw: ppAmp({ resistor: 10000, shuntResistor: 100, capacitor: 470e-12 }, 0.1) },
  { name: 'push-pull, too much feedback (oscillates)', raw: ppAmp({ resistor: 2200, shuntResistor: 100 }, 0.05), oscillates: true },
];

const c = (re: number, im: number): Complex => ({ re, im });
const div = (x: Complex, y: Complex): Complex => {
  const d = y.re * y.re + y.im * y.im;
  return { re: (x.re * y.re + x.im * y.im) / d, im: (x.im * y.re - x.re * y.im) / d };
};
const mul = (x: Complex, y: Complex): Complex => ({ re: x.re * y.re - x.im * y.im, im: x.re * y.im + x.im * y.re });
const abs = (x: Complex) => Math.hypot(x.re, x.im);

type SpiceLoop = { f: number[]; loop: Complex[]; closed: Complex[]; zout: Complex; thd: number | null; fundamental: number | null };

/** wrdata writes each vector after its own scale column: f re im | f re im | f re im */
const col = (row: number[], k: number) => c(row[3 * k + 1] as number, row[3 * k + 2] as number);

async function spiceLoop(raw: ChainInputRaw, tag: string, oscillates: boolean): Promise<SpiceLoop> {
  const chain = parseChain(raw);
  const plan = planFeedback(chain);
  const p = prepareChain(plan.chain);
  const speaker = p.built.ports.find((x) => x.id === chain.feedback!.from)!.outputs.speaker!.node;
  const circuit = p.built.circuit;
  const ac = (inject: 'input' | 'voltage' | 'current' | 'output') =>
    ngspice(feedbackNetlist(circuit, speaker, FEEDBACK_NODES.tap, { kind: 'ac', inject, from: 1, to: 1e6, perDecade: 100 }), `fb-${tag}-${inject}`);
  const settle = 1.2;
  const runs = await Promise.all([
    ac('voltage'),
    ac('current'),
    ac('input'),
    ac('output'),
    oscillates
      ? Promise.resolve(null)
      : ngspice(feedbackNetlist(circuit, speaker, FEEDBACK_NODES.tap, { kind: 'tran', amplitude: chain.input.amplitude, frequency: chain.input.frequency, settle, stepsPerPeriod: 256 }), `fb-${tag}-tran`),
  ]);
  const [rv, ri, rin, rout, rt] = runs;
  const tv = rv!.tables.ac!;
  const ti = ri!.tables.ac!;
  const f = tv.map((r) => r[0] as number);
  const loop = tv.map((row, k) => {
    const vspk = col(row, 0);
    const vtap = col(row, 1);
    const Tv = div(vspk, vtap);
    Tv.re = -Tv.re;
    Tv.im = -Tv.im;
    // i(VZ) flows from the tap through VZ to the speaker: the amplifier delivers −i(VZ) into the tap
    const iz = col(ti[k] as number[], 2);
    const ia = c(-iz.re, -iz.im);
    const ib = c(ia.re + 1, ia.im);
    const Ti = div(ia, ib);
    Ti.re = -Ti.re;
    Ti.im = -Ti.im;
    const num = mul(Tv, Ti);
    return div(c(num.re - 1, num.im), c(Tv.re + Ti.re + 2, Tv.im + Ti.im));
  });
  const closed = rin!.tables.ac!.map((row) => col(row, 0));
  const i1k = f.findIndex((x) => x >= 1000 * 0.9999);
  const zl = col(rout!.tables.ac![i1k] as number[], 0);
  const load = (chain.stages.find((s) => s.id === chain.feedback!.from) as { transformer: { speakerLoad: number } }).transformer.speakerLoad;
  const y = div(c(1, 0), zl);
  const zout = div(c(1, 0), c(y.re - 1 / load, y.im));
  let thd: number | null = null;
  let fundamental: number | null = null;
  if (rt) {
    thd = Number(/THD:\s*([-+0-9.eE]+)\s*%/.exec(rt.stdout)![1]);
    fundamental = Number(/^\s*1\s+1000\s+([-+0-9.eE]+)/m.exec(rt.stdout)![1]);
  }
  return { f, loop, closed, zout, thd, fundamental };
}

/** Log-frequency interpolation of sampled complex data (magnitude in log, phase linear). */
function interpolator(f: number[], v: Complex[]) {
  return (x: number): Complex => {
    let i = f.findIndex((y) => y >= x);
    if (i <= 0) i = 1;
    const t = Math.log(x / (f[i - 1] as number)) / Math.log((f[i] as number) / (f[i - 1] as number));
    const a = v[i - 1] as Complex;
    const r = div(v[i] as Complex, a);
    const lm = Math.log(abs(r));
    const ph = Math.atan2(r.im, r.re);
    const m = Math.exp(t * lm);
    return mul(a, c(m * Math.cos(t * ph), m * Math.sin(t * ph)));
  };
}

describe('global feedback vs ngspice', () => {
  const results: Record<string, { ours: ChainResult; spice: SpiceLoop }> = {};
  beforeAll(async () => {
    for (const [i, k] of cases.entries()) {
      const ours = analyzeChain(parseChain(k.raw), { sweep: false });
      results[k.name] = { ours, spice: await spiceLoop(k.raw, String(i), k.oscillates === true) };
    }
  }, 900_000);

  for (const k of cases) {
    it(`${k.name}: loop gain, closed-loop gain, margins, output impedance, −3 dB points, THD`, () => {
      const { ours, spice } = results[k.name]!;
      const fb = ours.feedback!;
      const i1k = spice.f.findIndex((x) => x >= 1000 * 0.9999);
      const t1k = spice.loop[i1k] as Complex;
      expect(Math.abs(fb.loopGain / abs(t1k) - 1)).toBeLessThan(0.01);
      expect(Math.abs(fb.closedLoopGain / abs(spice.closed[i1k] as Complex) - 1)).toBeLessThan(0.01);
      // margins from ngspice's samples (read with the same margin definitions, on ngspice's numbers)
      const at = interpolator(spice.f, spice.loop);
      const grid = logFrequencies(1, 1e6, 40);
      const theirs = loopStability(grid, grid.map(at), at);
      for (const side of ['low', 'high'] as const) {
        const a = fb.stability[side].phaseMargin;
        const b = theirs[side].phaseMargin;
        expect(a === null).toBe(b === null);
        if (a !== null && b !== null) expect(Math.abs(a - b)).toBeLessThan(2);
      }
      expect(fb.stability.verdict).toBe(theirs.verdict);
      if (k.oscillates) {
        expect(fb.stability.verdict).toBe('will-oscillate');
        return;
      }
      expect(Math.abs(fb.outputImpedance.closed / abs(spice.zout) - 1)).toBeLessThan(0.02);
      const mags = spice.closed.map(abs);
      const ref = mags[i1k] as number;
      const low = firstBelow(spice.f, mags, ref * Math.SQRT1_2, 1000, -1);
      const high = firstBelow(spice.f, mags, ref * Math.SQRT1_2, 1000, 1);
      expect(Math.abs(fb.bandwidth.closed.low! / low! - 1)).toBeLessThan(0.02);
      expect(Math.abs(fb.bandwidth.closed.high! / high! - 1)).toBeLessThan(0.02);
      // the nonlinear closed loop in the time domain
      expect(Math.abs(ours.output.amplitude / spice.fundamental! - 1)).toBeLessThan(0.01);
      expect(Math.abs(fb.distortion.closed!.thdPercent / spice.thd! - 1)).toBeLessThan(0.05);
    });
  }

  it('handbook relations beside them (computed figures): A/(1+T) and Blackman’s output impedance', () => {
    for (const k of cases) {
      const fb = results[k.name]!.ours.feedback!;
      const phase = (fb.loopGainPhaseDeg * Math.PI) / 180;
      const onePlusT = Math.hypot(1 + fb.loopGain * Math.cos(phase), fb.loopGain * Math.sin(phase));
      // closed-loop gain = A/(1 + Aβ) with Aβ the loop gain (common practice); exact when nothing passes the
      // feedback network forwards, so within 1 % here
      expect(Math.abs(fb.openLoopGain / onePlusT / fb.closedLoopGain - 1)).toBeLessThan(0.01);
      // output impedance reduced by (1 + T) with T taken with the speaker disconnected (Blackman; common
      // practice): the loaded loop gain scales by (RL + Zo)/RL when the load is removed
      if (!k.oscillates) {
        const load = 8;
        const tOpenCircuit = fb.loopGain * (1 + fb.outputImpedance.open / load);
        expect(Math.abs(fb.outputImpedance.open / (1 + tOpenCircuit) / fb.outputImpedance.closed - 1)).toBeLessThan(0.05);
      }
      // the feedback reduces distortion at the same output (time-domain solves)
      if (fb.distortion.closed) expect(fb.distortion.closed.thdPercent).toBeLessThan(fb.distortion.open.thdPercent);
    }
  });
});
