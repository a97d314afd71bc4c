// npm run bench:calc — lib/calc against ngspice on the fixture circuits (same analyses: op, AC gain, THD).
// Targets: a full stage analysis under 2 ms and at least 100× faster than ngspice on the same work (op + ac + tran).
// `--quick` takes fewer runs; `--runs N` sets the engine runs per circuit. Model evaluations (plate, screen and
// grid current calls per analysis) are a load-independent cost measure next to the noisy wall-clock times.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { analyzeStage, stageNetlist, type SpiceAnalysis } from '../lib/calc';
import { modelEvaluations } from '../lib/calc/models/registry';
import { stageInputSchema, type StageInput } from '../lib/validation/stage';

const FIXTURES = path.resolve(__dirname, '../tests/fixtures/stages');
const dir = mkdtempSync(path.join(tmpdir(), 'anodyne-bench-'));

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? 0;
}

function timeCalc(input: StageInput, runs: number): number {
  for (let i = 0; i < 20; i++) analyzeStage(input);
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    analyzeStage(input);
    times.push(performance.now() - t0);
  }
  return median(times);
}

function timeSpice(input: StageInput, analyses: SpiceAnalysis[], name: string, runs: number): number {
  const file = path.join(dir, `${name}-${analyses.join('-')}.cir`);
  writeFileSync(file, stageNetlist(input, { analyses }));
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    execFileSync('ngspice', ['-b', file], { stdio: 'pipe', maxBuffer: 64 * 1024 * 1024 });
    times.push(performance.now() - t0);
  }
  return median(times);
}

function evaluationsOf(input: StageInput): { count: number; fallbacks: number } {
  modelEvaluations.count = 0;
  modelEvaluations.newtonFallbacks = 0;
  analyzeStage(input);
  return { count: modelEvaluations.count, fallbacks: modelEvaluations.newtonFallbacks };
}

const TARGET_MS = 2;
const TARGET_RATIO = 100;
const quick = process.argv.includes('--quick');
const runsArg = process.argv.indexOf('--runs');
const engineRuns = runsArg >= 0 ? Number(process.argv[runsArg + 1]) : quick ? 50 : 200;
const rows: string[][] = [];
let misses = 0;
const ratios: number[] = [];
const calcTimes: number[] = [];
for (const f of readdirSync(FIXTURES).filter((x) => x.endsWith('.json')).sort()) {
  const name = f.replace(/\.json$/, '');
  const input = stageInputSchema.parse(JSON.parse(readFileSync(path.join(FIXTURES, f), 'utf8')));
  const idle = { ...input, drive: { ...input.drive, amplitude: 0 } } as StageInput;
  const calcSmall = timeCalc(idle, engineRuns);
  const calcFull = timeCalc(input, engineRuns);
  const evals = evaluationsOf(input);
  const runs = quick ? 1 : 3;
  const spOp = timeSpice(input, ['op'], name, runs);
  const spAc = timeSpice(input, ['op', 'ac'], name, runs);
  const spFull = timeSpice(input, ['op', 'ac', 'tran'], name, runs);
  const ratio = spFull / calcFull;
  ratios.push(ratio);
  calcTimes.push(calcFull);
  const pass = calcFull < TARGET_MS && ratio >= TARGET_RATIO;
  if (!pass) misses++;
  rows.push([
    name,
    calcSmall.toFixed(3),
    calcFull.toFixed(3),
    spOp.toFixed(0),
    spAc.toFixed(0),
    spFull.toFixed(0),
    `${(spOp / calcSmall).toFixed(0)}×`,
    `${ratio.toFixed(0)}×`,
    String(evals.count),
    String(evals.fallbacks),
    pass ? 'pass' : 'MISS',
  ]);
}
const header = [
  'circuit',
  'calc op+ac ms',
  'calc full ms',
  'spice op ms',
  'spice op+ac ms',
  'spice op+ac+tran ms',
  'op ratio',
  'full ratio',
  'model evals',
  'fallbacks',
  `< ${TARGET_MS} ms & ≥ ${TARGET_RATIO}×`,
];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
const line = (r: string[]) => r.map((c, i) => (i === 0 ? c.padEnd(widths[i] ?? 0) : c.padStart(widths[i] ?? 0))).join('  ');
console.log(line(header));
for (const r of rows) console.log(line(r));
console.log(
  `\nfull analysis (op, small signal, 200-point response, FFT THD, headroom, plots): median ${median(calcTimes).toFixed(3)} ms, max ${Math.max(...calcTimes).toFixed(3)} ms; ngspice/calc ratio min ${Math.min(...ratios).toFixed(0)}×, median ${median(ratios).toFixed(0)}×`,
);
console.log(`calc times are medians of ${engineRuns} runs after 20 warm-up runs; ${misses === 0 ? 'every circuit meets' : `${misses} circuit(s) miss`} the targets.`);
console.log('ngspice times are whole processes (start-up included), the way the product would have to run it.');
console.log('model evals: tube-model calls per full analysis; fallbacks: samples where Newton handed over to bracketing.');
