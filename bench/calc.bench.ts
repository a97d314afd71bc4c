// npm run bench:calc — lib/calc against ngspice on the fixture circuits (same analyses: op, AC gain, THD).
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { analyzeStage, stageNetlist, type SpiceAnalysis } from '../lib/calc';
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

const quick = process.argv.includes('--quick');
const rows: string[][] = [];
const ratios: number[] = [];
const calcTimes: number[] = [];
for (const f of readdirSync(FIXTURES).filter((x) => x.endsWith('.json')).sort()) {
  const name = f.replace(/\.json$/, '');
  const input = stageInputSchema.parse(JSON.parse(readFileSync(path.join(FIXTURES, f), 'utf8')));
  const idle = { ...input, drive: { ...input.drive, amplitude: 0 } } as StageInput;
  const calcSmall = timeCalc(idle, quick ? 50 : 200);
  const calcFull = timeCalc(input, quick ? 50 : 200);
  const runs = quick ? 1 : 3;
  const spOp = timeSpice(input, ['op'], name, runs);
  const spAc = timeSpice(input, ['op', 'ac'], name, runs);
  const spFull = timeSpice(input, ['op', 'ac', 'tran'], name, runs);
  ratios.push(spFull / calcFull);
  calcTimes.push(calcFull);
  rows.push([
    name,
    calcSmall.toFixed(3),
    calcFull.toFixed(3),
    spOp.toFixed(0),
    spAc.toFixed(0),
    spFull.toFixed(0),
    `${(spOp / calcSmall).toFixed(0)}×`,
    `${(spFull / calcFull).toFixed(0)}×`,
  ]);
}
const header = ['circuit', 'calc op+ac ms', 'calc full ms', 'spice op ms', 'spice op+ac ms', 'spice op+ac+tran ms', 'op ratio', 'full ratio'];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
const line = (r: string[]) => r.map((c, i) => (i === 0 ? c.padEnd(widths[i] ?? 0) : c.padStart(widths[i] ?? 0))).join('  ');
console.log(line(header));
for (const r of rows) console.log(line(r));
console.log(
  `\nfull analysis (op, small signal, 200-point response, FFT THD, headroom, plots): median ${median(calcTimes).toFixed(3)} ms, max ${Math.max(...calcTimes).toFixed(3)} ms; ngspice/calc ratio min ${Math.min(...ratios).toFixed(0)}×, median ${median(ratios).toFixed(0)}×`,
);
console.log('ngspice times are whole processes (start-up included), the way the product would have to run it.');
