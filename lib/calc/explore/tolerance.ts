// Tolerance runs (Monte Carlo): every part within its tolerance, the supply with the mains, the tube within its
// spread; each trial is one build of the stage. Trials are independent and seeded per index, so any split of a
// run into blocks (threads, machines) gives the same builds.
import { DEFAULT_BENCH_TOLERANCE, type BenchQuantity } from '../bench';
import { CalcError } from '../errors';
import { analyzeStage } from '../index';
import type { StageInput } from '../input';
import type { OperatingPoint, StageAnalysis } from '../types';
import { availableMetrics, METRIC_BY_KEY, metricValue, type MetricKey } from './metrics';
import { getPath, scaleEmission, scaleMains, setPath, stageParts, type StagePart } from './parts';
import { createRng, drawFactor, type Distribution } from './random';
import { describe, spearmanMatrix, type DistributionStats as Stats } from './stats';

/** Common practice: carbon/metal film resistors come in 1 %, 5 % and 10 %; 5 % is the usual default. */
export const DEFAULT_RESISTOR_TOLERANCE = 0.05;
export const RESISTOR_TOLERANCE_CHOICES = [0.01, 0.05, 0.1] as const;
/** Common practice: electrolytic and film capacitors −20/+20 %. */
export const DEFAULT_CAPACITOR_TOLERANCE = { minus: 0.2, plus: 0.2 };
/** Common practice: public mains within ±10 % of nominal. */
export const DEFAULT_MAINS_VARIATION = { minus: 0.1, plus: 0.1 };
/** Common practice: plate current of new tubes of one type within ±20 % at the datasheet typical point. */
export const DEFAULT_TUBE_SPREAD = 0.2;

export type Band = { minus: number; plus: number };

export type ToleranceOptions = {
  trials: number;
  seed: number;
  distribution?: Distribution;
  resistorTolerance?: number;
  capacitorTolerance?: Band;
  /** per part path, overriding the defaults */
  parts?: Record<string, Band>;
  mains?: Band;
  /** ± fraction of plate current at the typical point */
  tubeSpread?: number;
  /** bench tolerances by quantity (fractions), e.g. the project's; missing keys use the bench default */
  benchTolerances?: Partial<Record<BenchQuantity, number>>;
};

export type VariedPart = StagePart & Band & { source: 'common practice' | 'entered' };

export type ToleranceSetup = {
  input: StageInput;
  trials: number;
  seed: number;
  distribution: Distribution;
  parts: VariedPart[];
  mains: Band;
  tubeSpread: number;
  metrics: MetricKey[];
  nominal: Partial<Record<MetricKey, number>>;
  bench: { key: BenchQuantity; nominal: number; tolerance: number }[];
};

/** Columns of drawn factors: the parts in order, then the mains, then the tube. */
export function factorColumns(setup: ToleranceSetup): { key: string; label: string }[] {
  return [
    ...setup.parts.map((p) => ({ key: p.path, label: p.label })),
    { key: 'mains', label: 'Mains (supply voltages)' },
    { key: 'tube', label: 'Tube (emission)' },
  ];
}

const BENCH_FROM_OP: { key: BenchQuantity; get: (op: OperatingPoint) => number | null }[] = [
  { key: 'plateVoltage', get: (op) => op.plateVoltage },
  { key: 'cathodeVoltage', get: (op) => op.cathodeVoltage },
  { key: 'screenVoltage', get: (op) => op.screenVoltage },
  { key: 'plateCurrent', get: (op) => op.plateCurrent },
  { key: 'plateCathodeVoltage', get: (op) => op.plateCathodeVoltage },
  { key: 'plateDissipation', get: (op) => op.plateDissipation },
  { key: 'screenDissipation', get: (op) => op.screenDissipation },
];

export function prepareTolerance(input: StageInput, options: ToleranceOptions): ToleranceSetup {
  if (!(Number.isInteger(options.trials) && options.trials > 0)) throw new CalcError('invalid-input', 'The number of trials must be a positive whole number.');
  const nominal = analyzeStage(input, { quick: true });
  const rTol = options.resistorTolerance ?? DEFAULT_RESISTOR_TOLERANCE;
  const cTol = options.capacitorTolerance ?? DEFAULT_CAPACITOR_TOLERANCE;
  const parts = stageParts(input).map((p) => {
    const band = options.parts?.[p.path] ?? (p.kind === 'resistor' ? { minus: rTol, plus: rTol } : cTol);
    if (!(band.minus >= 0 && band.minus < 1 && band.plus >= 0)) throw new CalcError('invalid-input', `The tolerance of the ${p.label.toLowerCase()} must be between 0 and 100 %.`);
    return { ...p, ...band, source: options.parts?.[p.path] ? ('entered' as const) : ('common practice' as const) };
  });
  const metrics = availableMetrics(nominal);
  const bench: ToleranceSetup['bench'] = [];
  for (const b of BENCH_FROM_OP) {
    const v = b.get(nominal.operatingPoint);
    if (v !== null && Number.isFinite(v) && Math.abs(v) > 1e-12) bench.push({ key: b.key, nominal: v, tolerance: options.benchTolerances?.[b.key] ?? DEFAULT_BENCH_TOLERANCE });
  }
  return {
    input,
    trials: options.trials,
    seed: options.seed | 0,
    distribution: options.distribution ?? 'normal',
    parts,
    mains: options.mains ?? DEFAULT_MAINS_VARIATION,
    tubeSpread: options.tubeSpread ?? DEFAULT_TUBE_SPREAD,
    metrics,
    nominal: Object.fromEntries(metrics.map((k) => [k, metricValue(nominal, k)])),
    bench,
  };
}

/** The stage of trial `index`, with the factors drawn for it (columns as in `factorColumns`). */
export function trialInput(setup: ToleranceSetup, index: number): { input: StageInput; factors: number[] } {
  const rng = createRng(setup.seed, index);
  let input = setup.input;
  const factors: number[] = [];
  for (const p of setup.parts) {
    const f = drawFactor(rng, p.minus, p.plus, setup.distribution);
    factors.push(f);
    input = setPath(input, p.path, (getPath(setup.input, p.path) as number) * f);
  }
  const mains = drawFactor(rng, setup.mains.minus, setup.mains.plus, setup.distribution);
  factors.push(mains);
  input = scaleMains(input, mains);
  const tube = drawFactor(rng, setup.tubeSpread, setup.tubeSpread, setup.distribution);
  factors.push(tube);
  input = { ...input, tube: scaleEmission(input.tube, tube) } as StageInput;
  return { input, factors };
}

/** Results of trials [from, to): column-wise, NaN where a trial could not be analysed. */
export type TrialBlock = {
  from: number;
  to: number;
  factors: Float64Array[];
  metrics: Float64Array[];
  /** 1 when some rating is exceeded */
  overRating: Uint8Array;
  /** per rating key: trials exceeding it */
  overByRating: Record<string, number>;
  /** 1 when some bench quantity is outside its tolerance of the nominal design */
  outsideBench: Uint8Array;
  outsideByBench: Record<string, number>;
  failures: Record<string, number>;
};

export function runToleranceTrials(setup: ToleranceSetup, from: number, to: number, isCancelled?: () => boolean): TrialBlock {
  const n = Math.max(0, to - from);
  const nf = setup.parts.length + 2;
  const block: TrialBlock = {
    from,
    to,
    factors: Array.from({ length: nf }, () => new Float64Array(n)),
    metrics: setup.metrics.map(() => new Float64Array(n).fill(NaN)),
    overRating: new Uint8Array(n),
    overByRating: {},
    outsideBench: new Uint8Array(n),
    outsideByBench: {},
    failures: {},
  };
  for (let i = 0; i < n; i++) {
    if (isCancelled && (i & 63) === 0 && isCancelled()) break;
    const { input, factors } = trialInput(setup, from + i);
    for (let c = 0; c < nf; c++) (block.factors[c] as Float64Array)[i] = factors[c] as number;
    let a: StageAnalysis;
    try {
      a = analyzeStage(input, { quick: true });
    } catch (e) {
      const code = e instanceof CalcError ? e.code : 'no-solution';
      block.failures[code] = (block.failures[code] ?? 0) + 1;
      continue;
    }
    setup.metrics.forEach((k, c) => ((block.metrics[c] as Float64Array)[i] = metricValue(a, k)));
    for (const r of a.ratings) {
      if (r.status === 'over') {
        block.overRating[i] = 1;
        block.overByRating[r.key] = (block.overByRating[r.key] ?? 0) + 1;
      }
    }
    const op = a.operatingPoint;
    for (const b of setup.bench) {
      const v = BENCH_FROM_OP.find((x) => x.key === b.key)?.get(op);
      if (v === null || v === undefined) continue;
      if (Math.abs(v - b.nominal) > b.tolerance * Math.abs(b.nominal)) {
        block.outsideBench[i] = 1;
        block.outsideByBench[b.key] = (block.outsideByBench[b.key] ?? 0) + 1;
      }
    }
  }
  return block;
}

export type ToleranceSummary = {
  trials: number;
  completed: number;
  failed: number;
  failures: Record<string, number>;
  seed: number;
  distribution: Distribution;
  parts: { path: string; label: string; kind: string; nominal: number; minus: number; plus: number; source: string }[];
  mains: Band;
  tubeSpread: number;
  metrics: { key: MetricKey; label: string; unit: string; nominal: number | null; stats: Stats | null }[];
  /** share of analysed builds exceeding any rating, and per rating */
  overRatingShare: number;
  overByRating: { key: string; share: number }[];
  outsideBenchShare: number;
  outsideByBench: { key: string; nominal: number; tolerance: number; share: number }[];
  /** per metric: factors ranked by |Spearman ρ|, with ρ²/Σρ² as a rough share of the spread */
  sensitivity: { metric: MetricKey; ranking: { factor: string; label: string; rho: number; share: number }[] }[];
};

function concat(blocks: TrialBlock[], pick: (b: TrialBlock) => Float64Array | Uint8Array): Float64Array {
  const n = blocks.reduce((s, b) => s + (pick(b).length ?? 0), 0);
  const out = new Float64Array(n);
  let o = 0;
  for (const b of blocks) {
    out.set(pick(b), o);
    o += pick(b).length;
  }
  return out;
}

export function summarizeTolerance(setup: ToleranceSetup, blocksIn: TrialBlock[]): ToleranceSummary {
  const blocks = [...blocksIn].sort((a, b) => a.from - b.from);
  const cols = factorColumns(setup);
  const factors = cols.map((_, c) => concat(blocks, (b) => b.factors[c] as Float64Array));
  const metricCols = setup.metrics.map((_, c) => concat(blocks, (b) => b.metrics[c] as Float64Array));
  const total = factors[0]?.length ?? 0;
  const failures: Record<string, number> = {};
  const overByRating: Record<string, number> = {};
  const outsideByBench: Record<string, number> = {};
  let over = 0;
  let outside = 0;
  for (const b of blocks) {
    for (const [k, v] of Object.entries(b.failures)) failures[k] = (failures[k] ?? 0) + v;
    for (const [k, v] of Object.entries(b.overByRating)) overByRating[k] = (overByRating[k] ?? 0) + v;
    for (const [k, v] of Object.entries(b.outsideByBench)) outsideByBench[k] = (outsideByBench[k] ?? 0) + v;
    for (const x of b.overRating) over += x;
    for (const x of b.outsideBench) outside += x;
  }
  const failed = Object.values(failures).reduce((s, v) => s + v, 0);
  const analysed = Math.max(1, total - failed);
  const rho = spearmanMatrix(factors, metricCols);
  return {
    trials: setup.trials,
    completed: total,
    failed,
    failures,
    seed: setup.seed,
    distribution: setup.distribution,
    parts: setup.parts.map((p) => ({
      path: p.path,
      label: p.label,
      kind: p.kind,
      nominal: p.nominal,
      minus: p.minus,
      plus: p.plus,
      source: p.source,
    })),
    mains: setup.mains,
    tubeSpread: setup.tubeSpread,
    metrics: setup.metrics.map((k, c) => ({
      key: k,
      label: METRIC_BY_KEY[k].label,
      unit: METRIC_BY_KEY[k].unit,
      nominal: setup.nominal[k] ?? null,
      stats: describe(metricCols[c] as Float64Array),
    })),
    overRatingShare: over / analysed,
    overByRating: Object.entries(overByRating).map(([key, v]) => ({ key, share: v / analysed })).sort((a, b) => b.share - a.share),
    outsideBenchShare: outside / analysed,
    outsideByBench: setup.bench.map((b) => ({ key: b.key, nominal: b.nominal, tolerance: b.tolerance, share: (outsideByBench[b.key] ?? 0) / analysed })),
    sensitivity: setup.metrics.map((k, c) => {
      const rhos = cols.map((col, f) => ({ factor: col.key, label: col.label, rho: (rho[c] as number[])[f] as number }));
      const sum = rhos.reduce((s, r) => s + r.rho * r.rho, 0);
      return {
        metric: k,
        ranking: rhos.map((r) => ({ ...r, share: sum > 0 ? (r.rho * r.rho) / sum : 0 })).sort((a, b) => Math.abs(b.rho) - Math.abs(a.rho)),
      };
    }),
  };
}
