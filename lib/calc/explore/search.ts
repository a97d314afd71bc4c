// Part search: standard values for the parts marked free, targets and limits on the results, an objective.
// Small spaces are searched exhaustively; larger ones by a genetic algorithm on series indices (tournament
// selection with the feasibility rules of Deb 2000 — a feasible candidate beats an infeasible one, infeasible ones
// compare by total violation — uniform crossover, step mutation, elitism). Pure: the caller supplies the
// (possibly parallel) evaluation of a batch.
import { CalcError } from '../errors';
import { analyzeStage } from '../index';
import type { StageInput } from '../input';
import { METRIC_BY_KEY, metricValue, type MetricKey } from './metrics';
import { getPath, setPath } from './parts';
import { createRng } from './random';
import { seriesValues, type SeriesName } from './series';

export type FreePart = { path: string; min: number; max: number; series: SeriesName };
export type SearchConstraint = { metric: MetricKey; op: 'atLeast' | 'atMost'; value: number };
export type SearchObjective = { metric: MetricKey; direction: 'maximize' | 'minimize' };

export type SearchSpec = {
  input: StageInput;
  free: FreePart[];
  constraints: SearchConstraint[];
  objective: SearchObjective;
  /** the two objectives of the trade-off plot (default: the objective against the first constraint's metric) */
  tradeoff?: [SearchObjective, SearchObjective];
  /** THD and the other large-signal results at this output level (V peak), the drive set from each candidate's gain */
  outputLevel?: number | null;
  /** largest number of candidate analyses; an exhaustive search is used when the space is no larger */
  maxEvaluations: number;
  seed: number;
  /** how many best candidates to keep */
  keep?: number;
};

export type SearchSetup = {
  spec: SearchSpec;
  values: number[][];
  size: number;
  mode: 'exhaustive' | 'genetic';
  metrics: MetricKey[];
  tradeoff: [SearchObjective, SearchObjective];
};

export type Candidate = {
  /** series index per free part */
  index: number[];
  /** part values per free part */
  parts: number[];
  metrics: Partial<Record<MetricKey, number>>;
  feasible: boolean;
  violation: number;
  /** objective value (NaN when the analysis failed) */
  objective: number;
  error: string | null;
};

export function prepareSearch(spec: SearchSpec): SearchSetup {
  if (spec.free.length === 0) throw new CalcError('invalid-input', 'Mark at least one part as free.');
  const values = spec.free.map((f) => {
    if (typeof getPath(spec.input, f.path) !== 'number') throw new CalcError('invalid-input', `The stage has no part '${f.path}'.`);
    const v = seriesValues(f.series, f.min, f.max);
    if (v.length === 0) throw new CalcError('invalid-input', `No ${f.series} value lies between the limits of '${f.path}'.`);
    return v;
  });
  const size = values.reduce((p, v) => p * v.length, 1);
  const tradeoff: [SearchObjective, SearchObjective] = spec.tradeoff ?? [
    spec.objective,
    spec.constraints[0] ? { metric: spec.constraints[0].metric, direction: spec.constraints[0].op === 'atLeast' ? 'maximize' : 'minimize' } : { metric: 'gain', direction: 'maximize' },
  ];
  const metrics = [...new Set<MetricKey>([spec.objective.metric, ...spec.constraints.map((c) => c.metric), tradeoff[0].metric, tradeoff[1].metric, 'gain', 'headroom', 'plateCurrent', 'plateDissipationShare'])];
  return { spec, values, size, mode: size <= spec.maxEvaluations ? 'exhaustive' : 'genetic', metrics, tradeoff };
}

/** Mixed-radix decoding of a linear index into series indices (first part varies slowest). */
export function decodeIndex(setup: SearchSetup, linear: number): number[] {
  const idx = new Array<number>(setup.values.length);
  let r = linear;
  for (let p = setup.values.length - 1; p >= 0; p--) {
    const n = (setup.values[p] as number[]).length;
    idx[p] = r % n;
    r = Math.floor(r / n);
  }
  return idx;
}

const signed = (o: SearchObjective, v: number) => (o.direction === 'maximize' ? v : -v);

/** Analyses one candidate (quick analysis; with an output level, first at idle for the gain, then driven). */
export function evaluateCandidate(setup: SearchSetup, index: number[]): Candidate {
  const { spec } = setup;
  let input = spec.input;
  const parts = index.map((i, p) => (setup.values[p] as number[])[i] as number);
  spec.free.forEach((f, p) => (input = setPath(input, f.path, parts[p])));
  const metrics: Partial<Record<MetricKey, number>> = {};
  try {
    if (spec.outputLevel && spec.outputLevel > 0) {
      const idle = analyzeStage({ ...input, drive: { ...input.drive, amplitude: 0 } } as StageInput, { quick: true });
      const g = Math.abs(idle.smallSignal.gain);
      if (!(g > 0)) throw new CalcError('no-solution', 'no gain');
      input = { ...input, drive: { ...input.drive, amplitude: spec.outputLevel / g } } as StageInput;
    }
    const a = analyzeStage(input, { quick: true });
    for (const k of setup.metrics) metrics[k] = metricValue(a, k);
  } catch (e) {
    return { index, parts, metrics, feasible: false, violation: 1e9, objective: NaN, error: e instanceof CalcError ? e.code : 'no-solution' };
  }
  let violation = 0;
  for (const c of spec.constraints) {
    const v = metrics[c.metric] ?? NaN;
    const scale = Math.max(Math.abs(c.value), 1e-12);
    if (!Number.isFinite(v)) violation += 1e6;
    else if (c.op === 'atLeast' && v < c.value) violation += (c.value - v) / scale;
    else if (c.op === 'atMost' && v > c.value) violation += (v - c.value) / scale;
  }
  const objective = metrics[spec.objective.metric] ?? NaN;
  return { index, parts, metrics, feasible: violation === 0 && Number.isFinite(objective), violation, objective, error: null };
}

/** True when a is better than b (Deb's feasibility rules, then the objective). */
export function better(setup: SearchSetup, a: Candidate, b: Candidate): boolean {
  if (a.feasible !== b.feasible) return a.feasible;
  if (!a.feasible) return a.violation < b.violation;
  return signed(setup.spec.objective, a.objective) > signed(setup.spec.objective, b.objective);
}

/** Non-dominated feasible candidates for the two trade-off objectives. */
export function paretoFront(setup: SearchSetup, cands: Candidate[]): Candidate[] {
  const [o1, o2] = setup.tradeoff;
  const pts = cands
    .filter((c) => c.feasible && Number.isFinite(c.metrics[o1.metric] ?? NaN) && Number.isFinite(c.metrics[o2.metric] ?? NaN))
    .map((c) => ({ c, x: signed(o1, c.metrics[o1.metric] as number), y: signed(o2, c.metrics[o2.metric] as number) }))
    .sort((a, b) => b.x - a.x || b.y - a.y);
  const front: Candidate[] = [];
  let bestY = -Infinity;
  for (const p of pts) {
    if (p.y > bestY) {
      front.push(p.c);
      bestY = p.y;
    }
  }
  return front;
}

/** What a batch of evaluations is kept as: counts, the best few, the front, and a thinned sample for the plot. */
export type SearchDigest = {
  evaluations: number;
  feasible: number;
  failed: number;
  best: Candidate[];
  front: Candidate[];
  sample: Candidate[];
};

export function digest(setup: SearchSetup, cands: Candidate[], sampleEvery = 1): SearchDigest {
  const keep = setup.spec.keep ?? 20;
  const sorted = [...cands].sort((a, b) => (better(setup, a, b) ? -1 : better(setup, b, a) ? 1 : 0));
  return {
    evaluations: cands.length,
    feasible: cands.filter((c) => c.feasible).length,
    failed: cands.filter((c) => c.error !== null).length,
    best: sorted.slice(0, keep),
    front: paretoFront(setup, cands),
    sample: cands.filter((c, i) => c.error === null && i % Math.max(1, Math.round(sampleEvery)) === 0),
  };
}

export function mergeDigests(setup: SearchSetup, parts: SearchDigest[], maxSample = 1500): SearchDigest {
  const all = parts.flatMap((d) => d.best);
  const merged = digest(setup, all);
  const seen = new Set<string>();
  const uniq = (cs: Candidate[]) => cs.filter((c) => {
    const k = c.index.join(',');
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
  const best = uniq(merged.best);
  seen.clear();
  const sample = parts.flatMap((d) => d.sample);
  const stride = Math.max(1, Math.ceil(sample.length / maxSample));
  return {
    evaluations: parts.reduce((s, d) => s + d.evaluations, 0),
    feasible: parts.reduce((s, d) => s + d.feasible, 0),
    failed: parts.reduce((s, d) => s + d.failed, 0),
    best,
    front: uniq(paretoFront(setup, parts.flatMap((d) => d.front))),
    sample: sample.filter((_, i) => i % stride === 0),
  };
}

/** Exhaustive evaluation of linear indices [from, to). */
export function evaluateRange(setup: SearchSetup, from: number, to: number, sampleEvery = 1, isCancelled?: () => boolean): SearchDigest {
  const cands: Candidate[] = [];
  for (let i = from; i < to; i++) {
    if (isCancelled && (i & 63) === 0 && isCancelled()) break;
    cands.push(evaluateCandidate(setup, decodeIndex(setup, i)));
  }
  return digest(setup, cands, sampleEvery);
}

export function evaluateBatch(setup: SearchSetup, batch: number[][], isCancelled?: () => boolean): Candidate[] {
  const out: Candidate[] = [];
  for (const idx of batch) {
    if (isCancelled && isCancelled()) break;
    out.push(evaluateCandidate(setup, idx));
  }
  return out;
}

export type SearchProgress = { evaluations: number; total: number };

export type SearchResult = SearchDigest & {
  mode: 'exhaustive' | 'genetic';
  spaceSize: number;
  generations: number;
  free: { path: string; series: SeriesName; count: number; nominal: number }[];
  objective: SearchObjective;
  tradeoff: [SearchObjective, SearchObjective];
  constraints: SearchConstraint[];
  metricUnits: Partial<Record<MetricKey, string>>;
};

function finish(setup: SearchSetup, d: SearchDigest, generations: number): SearchResult {
  return {
    ...d,
    mode: setup.mode,
    spaceSize: setup.size,
    generations,
    free: setup.spec.free.map((f, p) => ({ path: f.path, series: f.series, count: (setup.values[p] as number[]).length, nominal: getPath(setup.spec.input, f.path) as number })),
    objective: setup.spec.objective,
    tradeoff: setup.tradeoff,
    constraints: setup.spec.constraints,
    metricUnits: Object.fromEntries(setup.metrics.map((k) => [k, METRIC_BY_KEY[k].unit])),
  };
}

export type SearchRunner = {
  /** evaluates linear index ranges (exhaustive mode), e.g. across worker threads */
  ranges: (ranges: [number, number][], sampleEvery: number) => Promise<SearchDigest[]>;
  /** evaluates a batch of index vectors (genetic mode) */
  batch: (batch: number[][]) => Promise<Candidate[]>;
  progress?: (p: SearchProgress) => void;
  isCancelled?: () => boolean;
};

/** Runs the search with the given evaluators (in-process or pooled). */
export async function runSearch(setup: SearchSetup, runner: SearchRunner, chunk = 2000): Promise<SearchResult> {
  const total = Math.min(setup.size, setup.spec.maxEvaluations);
  if (setup.mode === 'exhaustive') {
    const sampleEvery = Math.max(1, Math.ceil(setup.size / 1500));
    const ranges: [number, number][] = [];
    for (let a = 0; a < setup.size; a += chunk) ranges.push([a, Math.min(setup.size, a + chunk)]);
    const digests = await runner.ranges(ranges, sampleEvery);
    return finish(setup, mergeDigests(setup, digests), 0);
  }
  const rng = createRng(setup.spec.seed, 0x5ea2c4);
  const dims = setup.values.map((v) => v.length);
  const popSize = Math.min(400, Math.max(40, Math.round(Math.sqrt(total))));
  const randomIndex = () => dims.map((n) => Math.floor(rng.uniform() * n));
  let pop: Candidate[] = [];
  let digests: SearchDigest[] = [];
  let evaluations = 0;
  const sampleEvery = Math.max(1, Math.ceil(total / 1500));
  const evalBatch = async (batch: number[][]) => {
    const res = await runner.batch(batch);
    evaluations += res.length;
    digests.push(digest(setup, res, sampleEvery));
    if (digests.length > 20) digests = [mergeDigests(setup, digests, 3000)];
    runner.progress?.({ evaluations, total });
    return res;
  };
  // start from the stage's own values (nearest series value) plus random candidates
  const own = setup.spec.free.map((f, p) => {
    const x = getPath(setup.spec.input, f.path) as number;
    const vals = setup.values[p] as number[];
    let best = 0;
    vals.forEach((v, i) => {
      if (Math.abs(Math.log(v / x)) < Math.abs(Math.log((vals[best] as number) / x))) best = i;
    });
    return best;
  });
  pop = await evalBatch([own, ...Array.from({ length: popSize - 1 }, randomIndex)]);
  let generations = 0;
  const tournament = () => {
    const a = pop[Math.floor(rng.uniform() * pop.length)] as Candidate;
    const b = pop[Math.floor(rng.uniform() * pop.length)] as Candidate;
    return better(setup, a, b) ? a : b;
  };
  while (evaluations < total && !runner.isCancelled?.()) {
    generations++;
    const n = Math.min(popSize, total - evaluations);
    const children: number[][] = [];
    for (let k = 0; k < n; k++) {
      const p1 = tournament();
      const p2 = tournament();
      const child = p1.index.map((v, d) => (rng.uniform() < 0.5 ? v : (p2.index[d] as number)));
      for (let d = 0; d < dims.length; d++) {
        if (rng.uniform() < 1 / dims.length + 0.05) {
          const nd = dims[d] as number;
          if (rng.uniform() < 0.2) child[d] = Math.floor(rng.uniform() * nd);
          else {
            const step = 1 + Math.floor(rng.uniform() * 3);
            child[d] = Math.min(nd - 1, Math.max(0, (child[d] as number) + (rng.uniform() < 0.5 ? -step : step)));
          }
        }
      }
      children.push(child);
    }
    const res = await evalBatch(children);
    // elitist replacement: the best popSize of parents and children
    const merged = [...pop, ...res].sort((a, b) => (better(setup, a, b) ? -1 : better(setup, b, a) ? 1 : 0));
    const seen = new Set<string>();
    pop = merged.filter((c) => {
      const k = c.index.join(',');
      if (seen.has(k)) return false;
      seen.add(k);
      return true;
    }).slice(0, popSize);
    while (pop.length < 2) pop.push(merged[0] as Candidate);
  }
  return finish(setup, mergeDigests(setup, digests), generations);
}

/** In-process runner (tests, small searches). */
export function localRunner(setup: SearchSetup, progress?: (p: SearchProgress) => void): SearchRunner {
  return {
    ranges: async (ranges, sampleEvery) => ranges.map(([a, b]) => evaluateRange(setup, a, b, sampleEvery)),
    batch: async (batch) => evaluateBatch(setup, batch),
    progress,
  };
}
