// npm run bench:calc (also alone: tsx bench/feedback.bench.ts) — an amplifier with global feedback, against
// ngspice on the same work. Target: a push-pull amplifier (three stages and the loop) fully analysed, including
// the 1 Hz – 1 MHz loop response, margins and the closed- and open-loop distortion, in under 20 ms, and at least
// 100× faster than ngspice doing the same work (op, three AC sweeps for the loop gain and the closed-loop
// response, closed- and open-loop transients for THD). `--runs N` sets the engine runs.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { analyzeChain, prepareChain } from '../lib/calc/chain/solve';
import { analyzeFeedback, planFeedback, openLoop } from '../lib/calc/feedback/analysis';
import { FEEDBACK_NODES } from '../lib/calc/feedback/circuit';
import { solveLevel } from '../lib/calc/chain/solve';
import { feedbackNetlist } from '../tests/spice/support/feedback-netlist';
import { parseChain, ppAmp, seAmp } from '../tests/spice/support/feedback-cases';

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? 0;
const runsArg = process.argv.indexOf('--runs');
const runs = runsArg >= 0 ? Number(process.argv[runsArg + 1]) : 30;
const dir = mkdtempSync(path.join(tmpdir(), 'anodyne-fb-bench-'));

function timeIt(fn: () => unknown): number {
  for (let i = 0; i < 3; i++) fn();
  const t: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  return median(t);
}

function spiceWork(raw: ReturnType<typeof ppAmp>): number {
  const chain = parseChain(raw);
  const plan = planFeedback(chain);
  const p = prepareChain(plan.chain);
  const speaker = p.built.ports.find((x) => x.id === chain.feedback!.from)!.outputs.speaker!.node;
  const closed = p.built.circuit;
  const open = prepareChain({ ...plan.chain, feedback: { ...plan.chain.feedback!, loop: 'open' } as never }).built.circuit;
  const files: string[] = [];
  const write = (name: string, text: string) => {
    const f = path.join(dir, `${name}.cir`);
    writeFileSync(f, text.replace(/\{data:(\w+)\}/g, (_, t) => path.join(dir, `${name}-${t}.dat`)));
    files.push(f);
  };
  for (const inject of ['voltage', 'current', 'input'] as const) {
    write(`ac-${inject}`, feedbackNetlist(closed, speaker, FEEDBACK_NODES.tap, { kind: 'ac', inject, from: 1, to: 1e6, perDecade: 20 }));
  }
  const tran = { kind: 'tran' as const, amplitude: chain.input.amplitude, frequency: 1000, settle: 0.5, stepsPerPeriod: 128 };
  write('tran-closed', feedbackNetlist(closed, speaker, FEEDBACK_NODES.tap, tran));
  write('tran-open', feedbackNetlist(open, speaker, FEEDBACK_NODES.tap, tran).replace(/^VZ .*$/m, '').replace(/^R_RF_FB/m, 'R_RF_FB'));
  const t0 = performance.now();
  for (const f of files) execFileSync('ngspice', ['-b', f], { stdio: 'pipe', maxBuffer: 64 * 1024 * 1024 });
  return performance.now() - t0;
}

const cases = [
  { name: 'push-pull (12AX7 → 12AU7 LTP → 6L6GC pair), step network', raw: ppAmp({ resistor: 10000, shuntResistor: 100, capacitor: 470e-12 }, 0.1) },
  { name: 'single-ended (12AX7 → EL34), plain resistor', raw: seAmp({ resistor: 10000, shuntResistor: 220 }) },
];
console.log('amplifier | full chain analysis with feedback (ms) | feedback part alone (ms) | linear loop part (ms) | ngspice same work (ms) | ratio');
let worst = 0;
for (const c of cases) {
  const chain = parseChain(c.raw);
  const full = timeIt(() => analyzeChain(chain, { sweep: false }));
  const plan = planFeedback(chain);
  const main = solveLevel(plan.prepared, chain.input.amplitude, chain.input.frequency);
  const part = timeIt(() => analyzeFeedback(plan, main));
  const zero = parseChain({ ...c.raw, input: { amplitude: 0, frequency: 1000 } });
  const plan0 = planFeedback(zero);
  const linear = timeIt(() => analyzeFeedback(plan0, null));
  void openLoop;
  const spice = median([spiceWork(c.raw), spiceWork(c.raw), spiceWork(c.raw)]);
  const ratio = spice / full;
  worst = Math.max(worst, full);
  console.log(`${c.name} | ${full.toFixed(2)} | ${part.toFixed(2)} | ${linear.toFixed(2)} | ${spice.toFixed(0)} | ${ratio.toFixed(0)}×`);
}
console.log(`target: under 20 ms for the push-pull amplifier (worst here ${worst.toFixed(2)} ms) and ≥ 100× ngspice.`);
console.log('ngspice times are whole processes (start-up included); engine times are medians after warm-up; the machine is shared, so compare ratios.');
