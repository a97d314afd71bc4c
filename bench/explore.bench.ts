// npm run bench:explore — tolerance runs and part searches on the worker-thread pool (lib/explore/threads.ts).
// Targets: 10,000 trials of one stage in under 1 s, of a five-stage chain in under 10 s, and at least 100,000
// part-search candidates in under 60 s, on this 2-core machine. `--quick` runs a tenth of each.
import { readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { prepareChainTolerance, prepareSearch, prepareTolerance } from '../lib/calc/explore';
import type { ChainStage, ChainSupply } from '../lib/calc/chain';
import { ExplorePool } from '../lib/explore/threads';
import { stageInputSchema, type StageInput } from '../lib/validation/stage';

const quick = process.argv.includes('--quick');
const scale = quick ? 0.1 : 1;
const fixture = (name: string): StageInput =>
  stageInputSchema.parse(JSON.parse(readFileSync(path.resolve(__dirname, '../tests/fixtures/stages', `${name}.json`), 'utf8')));

const line = (label: string, value: string, target: string, pass: boolean) =>
  console.log(`${label.padEnd(44)} ${value.padStart(12)}   target ${target.padEnd(10)} ${pass ? 'pass' : 'MISS'}`);

// On a machine shared with other work the wall clock measures the neighbours too. The process's CPU time (all of
// its threads) divided by the threads gives the time the same run would take with those cores to itself.
let cpu0 = process.cpuUsage();
const startCpu = () => (cpu0 = process.cpuUsage());
const cpuSeconds = () => {
  const d = process.cpuUsage(cpu0);
  return (d.user + d.system) / 1e6;
};
const projected = (threads: number) => cpuSeconds() / threads;

async function main() {
  const pool = new ExplorePool();
  const t0 = performance.now();
  await pool.warm();
  console.log(`worker threads: ${pool.threads} (start-up and engine load ${(performance.now() - t0).toFixed(0)} ms, not counted below); load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')}`);

  // one stage: 12AX7 common cathode, bypassed
  const stage = fixture('cc-12ax7-bypassed');
  const trials = Math.round(10_000 * scale);
  // warm-up runs (a long-lived worker is warm): the engine's hot paths compiled in every thread
  await pool.tolerance(prepareTolerance(stage, { trials: 2000, seed: 99 }));
  let t = performance.now();
  startCpu();
  const setup = prepareTolerance(stage, { trials, seed: 1 });
  const summary = await pool.tolerance(setup);
  let ms = performance.now() - t;
  let idle = projected(pool.threads);
  console.log(`stage tolerance run: ${summary.completed} trials, ${summary.failed} failed`);
  line(`time to ${trials.toLocaleString('en')} stage trials`, `${(ms / 1000).toFixed(2)} s`, `< ${(scale * 1).toFixed(1)} s`, ms < 1000 * scale);
  line('stage trials/s', `${Math.round(trials / (ms / 1000)).toLocaleString('en')}`, '≥ 10,000', trials / (ms / 1000) >= 10_000);
  line(`  same, cores to itself (CPU time ÷ ${pool.threads})`, `${idle.toFixed(2)} s`, `< ${(scale * 1).toFixed(1)} s`, idle < scale);

  // five-stage chain on a three-node supply ladder
  const names = ['cc-12ax7-bypassed', 'cc-12ax7-unbypassed-load', 'cc-12at7-bypassed', 'cf-12au7-dc-coupled', 'pp-el34-a-cathode'];
  const chain: ChainStage[] = names.map((n, i) => ({ id: i + 1, name: `V${i + 1}`, position: i, supplyNode: i === 4 ? 'b1' : i >= 2 ? 'b2' : 'b3', input: fixture(n) }));
  const supply: ChainSupply = {
    rawVoltage: 470,
    sourceResistance: 40,
    nodes: [
      { key: 'b1', name: 'B+1', droppingResistor: 0, filterCapacitor: 100e-6 },
      { key: 'b2', name: 'B+2', droppingResistor: 2200, filterCapacitor: 47e-6 },
      { key: 'b3', name: 'B+3', droppingResistor: 10_000, filterCapacitor: 22e-6 },
    ],
  };
  await pool.chainTolerance(prepareChainTolerance(chain, supply, { trials: 200, seed: 99 }));
  t = performance.now();
  startCpu();
  const chainSetup = prepareChainTolerance(chain, supply, { trials, seed: 1 });
  const chainSummary = await pool.chainTolerance(chainSetup);
  ms = performance.now() - t;
  idle = projected(pool.threads);
  console.log(`chain tolerance run: ${chainSummary.completed} trials, ${chainSummary.failed} failed`);
  line(`time to ${trials.toLocaleString('en')} five-stage chain trials`, `${(ms / 1000).toFixed(2)} s`, `< ${(scale * 10).toFixed(0)} s`, ms < 10_000 * scale);
  line('chain trials/s', `${Math.round(trials / (ms / 1000)).toLocaleString('en')}`, '≥ 1,000', trials / (ms / 1000) >= 1000);
  line(`  same, cores to itself (CPU time ÷ ${pool.threads})`, `${idle.toFixed(2)} s`, `< ${(scale * 10).toFixed(0)} s`, idle < 10 * scale);

  // part search: plate, cathode and load resistors on E96, coupling capacitor on E12 (genetic: the space is larger)
  const candidates = Math.round(100_000 * scale);
  const base = fixture('cc-12ax7-unbypassed-load');
  const search = prepareSearch({
    input: base,
    free: [
      { path: 'plateResistor', min: 47e3, max: 330e3, series: 'E96' },
      { path: 'bias.cathodeResistor', min: 470, max: 4700, series: 'E96' },
      { path: 'load.resistance', min: 220e3, max: 1e6, series: 'E24' },
    ],
    constraints: [
      { metric: 'gain', op: 'atLeast', value: 30 },
      { metric: 'plateDissipationShare', op: 'atMost', value: 70 },
    ],
    objective: { metric: 'headroom', direction: 'maximize' },
    tradeoff: [{ metric: 'headroom', direction: 'maximize' }, { metric: 'gain', direction: 'maximize' }],
    maxEvaluations: candidates,
    seed: 1,
  });
  t = performance.now();
  startCpu();
  const result = await pool.search(search);
  ms = performance.now() - t;
  idle = projected(pool.threads);
  console.log(`part search: space ${search.size.toLocaleString('en')} (${result.mode}), ${result.evaluations.toLocaleString('en')} candidates, ${result.feasible.toLocaleString('en')} feasible, best headroom ${result.best[0]?.metrics.headroom?.toFixed(3)} V`);
  line(`time to ${result.evaluations.toLocaleString('en')} candidates`, `${(ms / 1000).toFixed(2)} s`, `< ${(scale * 60).toFixed(0)} s`, ms < 60_000 * scale);
  line('candidates/s', `${Math.round(result.evaluations / (ms / 1000)).toLocaleString('en')}`, '≥ 1,667', result.evaluations / (ms / 1000) >= 1667);
  line(`  same, cores to itself (CPU time ÷ ${pool.threads})`, `${idle.toFixed(2)} s`, `< ${(scale * 60).toFixed(0)} s`, idle < 60 * scale);
  await pool.destroy();
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
