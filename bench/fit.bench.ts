// Times the curve fits: npx tsx bench/fit.bench.ts
import { fitKorenPentode, fitKorenTriode } from '../lib/calc/fit';
import { range, synthesizePentodeCurves, synthesizeTriodeCurves } from '../lib/curves/synthetic';

const RUNS = 10;

// Koren 1996 published sets.
const triode = synthesizeTriodeCurves({
  params: { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 },
  gridVoltages: Array.from({ length: 10 }, (_, k) => -0.5 * k),
  plateVoltages: Array.from({ length: 30 }, (_, k) => (400 * (k + 1)) / 30),
  noise: { relative: 0.01, seed: 1 },
});
const pentode = synthesizePentodeCurves({
  params: { mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 },
  gridVoltages: range(-30, 0, 5),
  plateVoltages: Array.from({ length: 25 }, (_, k) => 20 * (k + 1)),
  screenVoltages: [250, 300],
  noise: { relative: 0.01, seed: 2 },
});

function time(label: string, points: number, run: () => { iterations: number; rmsErrorPercent: number }): void {
  const first = performance.now();
  run();
  const cold = performance.now() - first;
  const times: number[] = [];
  let last = { iterations: 0, rmsErrorPercent: 0 };
  for (let k = 0; k < RUNS; k++) {
    const t0 = performance.now();
    last = run();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  const median = times[Math.floor(times.length / 2)] ?? NaN;
  console.log(
    `${label}: ${points} points, cold ${cold.toFixed(1)} ms, median ${median.toFixed(1)} ms, ` +
      `worst ${(times.at(-1) ?? NaN).toFixed(1)} ms (${RUNS} runs), ${last.iterations} iterations, rms ${last.rmsErrorPercent.toFixed(2)} %`,
  );
}

time('koren-triode (12AX7)', triode.length, () => fitKorenTriode(triode));
time('koren-pentode (EL34, with screen current)', pentode.length, () => fitKorenPentode(pentode));
