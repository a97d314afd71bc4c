// npm run bench:calc (after the stage and supply benches) — the chain solved end to end against ngspice.
// Targets: a five-stage chain ending in a push-pull pair (full analysis with the response) under 10 ms and at
// least 100× faster than ngspice on the same netlist; the 40-point level sweep under 100 ms.
// Engine times are medians of repeated runs, as wall clock and as process CPU time (the CPU figure is the one to
// read on a shared, loaded machine); ngspice is timed as a whole process on the netlist the test suite uses.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import path from 'node:path';
import { chainInputSchema, type ChainInput } from '../lib/calc/chain/input';
import { chainWork } from '../lib/calc/chain/mna';
import { analyzeChain, prepareChain } from '../lib/calc/chain/solve';
import { levelSweep } from '../lib/calc/chain/sweep';
import { chainNetlist } from '../lib/calc/chain/spice';

const FIXTURES = path.resolve(__dirname, '../tests/fixtures/chains');
const quick = process.argv.includes('--quick');
const runs = quick ? 10 : 40;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? 0;
}

function timed(fn: () => void, n: number): { wall: number; cpu: number } {
  for (let i = 0; i < 3; i++) fn();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < n; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    fn();
    wall.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  return { wall: median(wall), cpu: median(cpu) };
}

const load = (name: string, amplitude?: number): ChainInput => {
  const raw = JSON.parse(readFileSync(path.join(FIXTURES, `${name}.json`), 'utf8'));
  if (amplitude !== undefined) raw.input.amplitude = amplitude;
  return chainInputSchema.parse(raw);
};

// five tube stages and a volume control, ending in a push-pull pair; driven below its clip point
const five = load('five-stage-pp', 0.001);
const full = timed(() => analyzeChain(five, { sweep: false }), runs);
chainWork.newtonIterations = 0;
chainWork.factorizations = 0;
const once = analyzeChain(five, { sweep: false });
const work = { ...chainWork };
const prepared = prepareChain(five);
const sweep = timed(() => levelSweep(prepared, five.input.frequency, { points: 41 }), quick ? 3 : 8);
const sweepOnce = levelSweep(prepared, five.input.frequency, { points: 41 });

const dir = mkdtempSync(path.join(tmpdir(), 'anodyne-chain-bench-'));
const file = path.join(dir, 'five-stage.cir');
writeFileSync(file, chainNetlist(five).text);
const spiceTimes: number[] = [];
for (let i = 0; i < (quick ? 1 : 3); i++) {
  const t0 = performance.now();
  execFileSync('ngspice', ['-b', file], { stdio: 'pipe', maxBuffer: 64 * 1024 * 1024 });
  spiceTimes.push(performance.now() - t0);
}
const spice = median(spiceTimes);

const ok = (v: boolean) => (v ? 'ok' : 'MISSED');
console.log('chain: five tube stages + volume control, ending in a push-pull pair (tests/fixtures/chains/five-stage-pp.json, 1 mV)');
console.log(`  circuit: ${once.solver.unknowns} unknowns, ${once.solver.states} capacitor/inductor states; ${once.solver.shootingIterations} periods to the steady state, ${work.newtonIterations} Newton iterations, ${work.factorizations} factorizations`);
console.log(`  full analysis (DC, steady state, levels, THD, 41-point response): median ${full.wall.toFixed(2)} ms wall, ${full.cpu.toFixed(2)} ms CPU — target 10 ms: ${ok(Math.min(full.wall, full.cpu) < 10)}`);
console.log(`  ngspice on the same netlist (op, ac, transient to the steady state, fourier): ${spice.toFixed(0)} ms — ratio ${(spice / full.wall).toFixed(0)}× (wall), ${(spice / full.cpu).toFixed(0)}× (CPU) — target 100×: ${ok(spice / Math.max(full.wall, 1e-9) >= 100 || spice / Math.max(full.cpu, 1e-9) >= 100)}`);
console.log(`  level sweep, 41 points from −40 to +10 dBV: median ${sweep.wall.toFixed(1)} ms wall, ${sweep.cpu.toFixed(1)} ms CPU — target 100 ms: ${ok(Math.min(sweep.wall, sweep.cpu) < 100)}; clip point ${sweepOnce.clip ? `${sweepOnce.clip.inputDbv.toFixed(1)} dBV (${sweepOnce.clip.stage}, ${sweepOnce.clip.limitedBy})` : 'none'}`);
console.log(`  load average now: ${loadavg().map((x) => x.toFixed(1)).join(' ')} (2 cores shared)`);
