// npm run bench:supply (also run by npm run bench:calc) — the supply solver against ngspice on the same netlists.
// Target: the six-node supply solved with six stages at idle and full drive in under 20 ms.
// `--quick` takes fewer runs. Times are medians of warm runs (JIT warmed first); ngspice is one process per
// run of a transient long enough to reach the steady state from the hand-estimate start (as in the tests).
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import os, { tmpdir } from 'node:os';
import path from 'node:path';
import { solveSupply, supplyNetlist, type SupplyCircuit } from '../lib/calc/supply';
import { solveSupplyWithStages, type SupplyStage } from '../lib/calc/supply/with-stages';
import { stageInputSchema } from '../lib/validation/stage';
import { supplyCircuitSchema } from '../lib/validation/supply';

const SUPPLIES = path.resolve(__dirname, '../tests/fixtures/supplies');
const STAGES = path.resolve(__dirname, '../tests/fixtures/stages');
const quick = process.argv.includes('--quick');
const runs = quick ? 15 : 60;
const dir = mkdtempSync(path.join(tmpdir(), 'anodyne-supply-bench-'));

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? 0;
const mins: Record<string, number> = {};
function time(fn: () => unknown, n: number, label?: string): number {
  for (let i = 0; i < Math.min(10, n); i++) fn();
  const ts: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    fn();
    ts.push(performance.now() - t0);
  }
  if (label) mins[label] = Math.min(...ts);
  return median(ts);
}

function spiceTime(c: SupplyCircuit, name: string, stop: number): number {
  const r = solveSupply(c, { steadyStateOnly: true });
  const f = r.mainsFrequency;
  // start from 97 % of the node voltages, as a rough hand estimate would
  const cir = path.join(dir, `${name}.cir`);
  writeFileSync(cir, supplyNetlist(c, { stop, window: 2 / f, maxStep: 1 / f / 1000, initial: r.nodes.map((n) => 0.97 * n.dc), dataFile: path.join(dir, `${name}.dat`) }));
  const t0 = performance.now();
  execFileSync('ngspice', ['-b', cir], { stdio: 'pipe', maxBuffer: 64 * 1024 * 1024 });
  return performance.now() - t0;
}

const rows: string[][] = [];
for (const f of readdirSync(SUPPLIES).filter((x) => x.endsWith('.json')).sort()) {
  const name = f.replace(/\.json$/, '');
  const c = supplyCircuitSchema.parse(JSON.parse(readFileSync(path.join(SUPPLIES, f), 'utf8')));
  const steady = time(() => solveSupply(c, { steadyStateOnly: true }), runs);
  const complete = time(() => solveSupply(c), Math.max(5, Math.round(runs / 3)));
  const stop = name.startsWith('class-ab') ? 8 : 4;
  const spice = spiceTime(c, name, stop);
  const nodes = solveSupply(c, { steadyStateOnly: true }).nodes.length;
  rows.push([name, String(nodes), steady.toFixed(2), complete.toFixed(2), `${spice.toFixed(0)} (${stop} s)`, (spice / complete).toFixed(0)]);
}

// six nodes with six stages: output pair, screens, phase splitter, driver, two preamp stages
const stage = (file: string, id: number, name: string, node: string): SupplyStage => ({
  id,
  name,
  node,
  input: stageInputSchema.parse(JSON.parse(readFileSync(path.join(STAGES, file), 'utf8'))),
});
const six = supplyCircuitSchema.parse(JSON.parse(readFileSync(path.join(SUPPLIES, 'class-ab-six-nodes.json'), 'utf8')));
const sixNoLoads = { ...six, loads: six.loads.filter((l) => l.resistance !== undefined) };
const stages = [
  stage('pp-6l6-ab-fixed.json', 1, 'Output pair (class AB)', 'B+1'),
  stage('pentode-el34-screen-resistor.json', 2, 'Pentode driver', 'B+2'),
  stage('ltp-12au7-current-source.json', 3, 'Long-tailed pair', 'B+3'),
  stage('cc-12au7-fixed.json', 4, 'Driver', 'B+4'),
  stage('cc-12at7-bypassed.json', 5, 'Second preamp', 'B+5'),
  stage('cc-12ax7-bypassed.json', 6, 'First preamp', 'B+6'),
];
const coupled = solveSupplyWithStages(sixNoLoads, stages);
const tSteady = time(() => solveSupplyWithStages(sixNoLoads, stages, { steadyStateOnly: true }), Math.max(10, Math.round(runs / 2)), 'steady');
const tAll = time(() => solveSupplyWithStages(sixNoLoads, stages), Math.max(10, Math.round(runs / 2)), 'all');

const header = ['supply', 'nodes', 'idle+full ms', 'complete ms', 'ngspice ms', '× faster'];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
const line = (r: string[]) => r.map((c, i) => c.padStart(widths[i]!)).join('  ');
console.log('Supply solver against ngspice (idle+full: both periodic steady states; complete: plus low/high mains, switch-on transient, ratings)');
console.log(line(header));
for (const r of rows) console.log(line(r));
console.log('');
console.log(`Six nodes with six stages (${coupled.rounds} rounds, ${coupled.converged ? 'converged' : 'NOT converged'}):`);
for (const s of coupled.stages) console.log(`  ${s.name.padEnd(24)} ${s.node}  idle ${s.idleVoltage?.toFixed(1)} V ${((s.idleCurrent ?? 0) * 1000).toFixed(2)} mA   full drive ${s.fullDriveVoltage?.toFixed(1)} V ${((s.fullDriveCurrent ?? 0) * 1000).toFixed(2)} mA`);
console.log(`  stages + supply at idle and full drive: median ${tSteady.toFixed(2)} ms, fastest ${mins.steady!.toFixed(2)} ms (target < 20 ms: ${tSteady < 20 ? 'met' : mins.steady! < 20 ? 'met by the fastest run only' : 'MISSED'})`);
console.log(`  the same plus mains range, switch-on transient and ratings: median ${tAll.toFixed(2)} ms, fastest ${mins.all!.toFixed(2)} ms`);
console.log(`  (load average while measuring: ${os.loadavg()[0]!.toFixed(1)} on ${os.cpus().length} cores; medians grow with it)`);
