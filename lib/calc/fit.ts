import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import {
  korenPentodePlateCurrent,
  korenPentodeScreenCurrent,
  korenTriodeCurrent,
  type KorenPentodeParams,
  type KorenTriodeParams,
} from '@/lib/calc/models/koren';
import type { CurvePoint } from '@/lib/curves/types';

export type FitModel = 'koren-triode' | 'koren-pentode';

export type FitOptions = {
  /** Points whose measured current is below this (A) are skipped. Default: max(1 µA, 0.2 % of the largest current). */
  currentFloor?: number;
  /** Iteration cap per start. */
  maxIterations?: number;
  /** Clock for elapsedMs; lib/calc reads no clock of its own. */
  now?: () => number;
  /** Larger sets are thinned to this many evenly spaced points for the solver; errors still cover all. Default 2000. */
  maxFitPoints?: number;
  /** Called with 0…1 between starts. */
  onProgress?: (fraction: number) => void;
};

export type FitQuality = {
  /** Root-mean-square of (model/measured − 1), in percent, over the fitted points. */
  rmsErrorPercent: number;
  maxErrorPercent: number;
  pointCount: number;
};

type FitResultBase = FitQuality & {
  /** Points left out: current below the floor or Va ≤ 0. */
  skippedCount: number;
  /** Levenberg–Marquardt iterations summed over all starts. */
  iterations: number;
  starts: number;
  elapsedMs?: number;
  notes: string[];
};

export type TriodeFitResult = FitResultBase & { model: 'koren-triode'; parameters: KorenTriodeParams };

export type PentodeFitResult = FitResultBase & {
  model: 'koren-pentode';
  parameters: KorenPentodeParams;
  kg2Fitted: boolean;
  /** Quality of the screen-current fit, when the data had screen currents. */
  screen?: FitQuality;
};

export type FitResult = TriodeFitResult | PentodeFitResult;

export class CurveFitError extends Error {
  override name = 'CurveFitError';
}

/** Placeholder KG2 used by many published pentode sets when screen current was never fitted. */
export const PLACEHOLDER_KG2 = 4500;

const MIN_FIT_POINTS = 10;
const DEFAULT_MAX_ITERATIONS = 100;
const DEFAULT_MAX_FIT_POINTS = 2000;
const STARTS = 3;

type Bounds = { min: number[]; max: number[] };

// Parameters are fitted as logarithms: they span 1…10⁴ in size, and a single relative finite-difference step
// then suits all of them. Order: mu, ex, kg1, kp, kvb.
const TRIODE_BOUNDS: Bounds = {
  min: [0.5, 1.0, 1, 0.5, 1].map(Math.log),
  max: [500, 2.2, 1e5, 1e4, 1e5].map(Math.log),
};
const PENTODE_BOUNDS: Bounds = {
  min: [0.5, 1.0, 1, 0.5, 0.1].map(Math.log),
  max: [300, 2.2, 1e5, 1e4, 1e3].map(Math.log),
};

type Sample = { va: Float64Array; vg: Float64Array; vg2: Float64Array; measured: Float64Array; count: number };

type CurrentFn = (p: readonly number[], i: number) => number;

function clampLog(logs: number[], bounds: Bounds): number[] {
  return logs.map((v, k) => Math.min(Math.max(v, bounds.min[k] ?? v), bounds.max[k] ?? v));
}

function selectSample(
  points: readonly CurvePoint[],
  current: (p: CurvePoint) => number | undefined,
  floorOverride: number | undefined,
): { sample: Sample; skipped: number } {
  let maxI = 0;
  for (const p of points) {
    const i = current(p);
    if (i !== undefined && i > maxI) maxI = i;
  }
  const floor = floorOverride ?? Math.max(1e-6, 0.002 * maxI);
  const kept = points.filter((p) => {
    const i = current(p);
    return i !== undefined && Number.isFinite(i) && i >= floor && i > 0 && p.plateVoltage > 0;
  });
  const n = kept.length;
  const sample: Sample = {
    va: new Float64Array(n),
    vg: new Float64Array(n),
    vg2: new Float64Array(n),
    measured: new Float64Array(n),
    count: n,
  };
  kept.forEach((p, k) => {
    sample.va[k] = p.plateVoltage;
    sample.vg[k] = p.gridVoltage;
    sample.vg2[k] = p.screenVoltage ?? 0;
    sample.measured[k] = current(p) ?? 0;
  });
  return { sample, skipped: points.length - n };
}

function thin(sample: Sample, max: number): Sample {
  if (sample.count <= max) return sample;
  const n = Math.max(MIN_FIT_POINTS, Math.floor(max));
  const pick = (a: Float64Array) => Float64Array.from({ length: n }, (_, k) => a[Math.floor((k * sample.count) / n)] ?? 0);
  return { va: pick(sample.va), vg: pick(sample.vg), vg2: pick(sample.vg2), measured: pick(sample.measured), count: n };
}

const PARAM_LABELS = ['MU', 'EX', 'KG1', 'KP', 'KVB'];

function boundNotes(logs: readonly number[], bounds: Bounds): string[] {
  const notes: string[] = [];
  logs.forEach((v, k) => {
    const lo = bounds.min[k] ?? -Infinity;
    const hi = bounds.max[k] ?? Infinity;
    if (v - lo < 1e-6 || hi - v < 1e-6) {
      const edge = v - lo < 1e-6 ? 'lower' : 'upper';
      notes.push(`${PARAM_LABELS[k]} ended at its ${edge} bound (${Number(Math.exp(edge === 'lower' ? lo : hi).toPrecision(3))}); the data do not pin it down.`);
    }
  });
  return notes;
}

function thinningNote(fitted: Sample, all: Sample): string[] {
  return fitted.count < all.count
    ? [`Fitted on ${fitted.count} of ${all.count} points (evenly spaced); the errors are over all ${all.count}.`]
    : [];
}

function ratios(sample: Sample, fn: CurrentFn, params: readonly number[]): Float64Array {
  const r = new Float64Array(sample.count);
  for (let i = 0; i < sample.count; i++) r[i] = fn(params, i) / (sample.measured[i] ?? 1);
  return r;
}

/** Best scale c for Σ(c·rᵢ − 1)²: the current is proportional to 1/KG, so KG has a closed form. */
function bestScale(r: Float64Array): number {
  let s1 = 0;
  let s2 = 0;
  for (const v of r) {
    s1 += v;
    s2 += v * v;
  }
  return s2 > 0 ? s1 / s2 : 0;
}

function quality(r: Float64Array): FitQuality {
  let sum = 0;
  let max = 0;
  for (const v of r) {
    const e = v - 1;
    sum += e * e;
    max = Math.max(max, Math.abs(e));
  }
  const n = r.length;
  return { rmsErrorPercent: n > 0 ? Math.sqrt(sum / n) * 100 : NaN, maxErrorPercent: max * 100, pointCount: n };
}

function sumSquares(r: Float64Array): number {
  let s = 0;
  for (const v of r) s += (v - 1) * (v - 1);
  return s;
}

/**
 * µ from the data: at equal current, adjacent grid curves are shifted along Va by about µ·ΔVg.
 * Returns the median over adjacent pairs, or null when the curves do not overlap.
 */
export function estimateMuFromCurves(points: readonly CurvePoint[]): number | null {
  const byGrid = new Map<number, { va: number; ia: number }[]>();
  for (const p of points) {
    if (!(p.plateVoltage > 0) || !(p.plateCurrent > 0)) continue;
    const list = byGrid.get(p.gridVoltage) ?? [];
    list.push({ va: p.plateVoltage, ia: p.plateCurrent });
    byGrid.set(p.gridVoltage, list);
  }
  const grids = [...byGrid.keys()].sort((a, b) => b - a);
  const vaAt = (curve: { va: number; ia: number }[], ia: number): number | null => {
    for (let k = 1; k < curve.length; k++) {
      const a = curve[k - 1];
      const b = curve[k];
      if (a && b && a.ia <= ia && b.ia >= ia && b.ia > a.ia) return a.va + ((ia - a.ia) * (b.va - a.va)) / (b.ia - a.ia);
    }
    return null;
  };
  const estimates: number[] = [];
  for (let k = 1; k < grids.length; k++) {
    const g1 = grids[k - 1];
    const g2 = grids[k];
    if (g1 === undefined || g2 === undefined) continue;
    const c1 = (byGrid.get(g1) ?? []).sort((a, b) => a.va - b.va);
    const c2 = (byGrid.get(g2) ?? []).sort((a, b) => a.va - b.va);
    const peak = (c: { ia: number }[]) => c.reduce((m, p) => Math.max(m, p.ia), 0);
    const top = Math.min(peak(c1), peak(c2));
    const level = 0.5 * top;
    const va1 = vaAt(c1, level);
    const va2 = vaAt(c2, level);
    if (va1 !== null && va2 !== null && va2 > va1) estimates.push((va2 - va1) / (g1 - g2));
  }
  if (estimates.length === 0) return null;
  estimates.sort((a, b) => a - b);
  return estimates[Math.floor(estimates.length / 2)] ?? null;
}

type StartCandidate = { logs: number[]; sse: number };

/** Coarse grid over µ, EX, KP/µ (and KVB) with KG1 solved in closed form; returns diverse good starts. */
function gridStarts(
  sample: Sample,
  fn: CurrentFn,
  kvbValues: readonly number[],
  muValues: readonly number[],
  extraMu: number | null,
  bounds: Bounds,
): StartCandidate[] {
  const candidates: StartCandidate[] = [];
  const mus = extraMu !== null && Number.isFinite(extraMu) ? [...muValues, extraMu] : muValues;
  for (const mu of mus) {
    for (const ex of [1.2, 1.35, 1.5]) {
      for (const kpRatio of [2, 6, 15]) {
        for (const kvb of kvbValues) {
          const params = [mu, ex, 1, mu * kpRatio, kvb];
          const r = ratios(sample, fn, params);
          const c = bestScale(r);
          if (!(c > 0)) continue;
          const kg1 = 1 / c;
          for (let i = 0; i < r.length; i++) r[i] = (r[i] ?? 0) * c;
          const logs = clampLog([mu, ex, kg1, mu * kpRatio, kvb].map(Math.log), bounds);
          candidates.push({ logs, sse: sumSquares(r) });
        }
      }
    }
  }
  candidates.sort((a, b) => a.sse - b.sse);
  const chosen: StartCandidate[] = [];
  for (const c of candidates) {
    // Diversity in µ: starts that differ only in EX or KP tend to land in the same minimum.
    if (chosen.every((s) => Math.abs((s.logs[0] ?? 0) - (c.logs[0] ?? 0)) > Math.log(1.25))) chosen.push(c);
    if (chosen.length >= STARTS) break;
  }
  return chosen;
}

type LmOutcome = { logs: number[]; sse: number; iterations: number };

function runLm(sample: Sample, fn: CurrentFn, start: number[], bounds: Bounds, maxIterations: number): LmOutcome | null {
  const xs = Array.from({ length: sample.count }, (_, i) => i);
  const ys = new Array<number>(sample.count).fill(1);
  const model = (logs: number[]) => {
    const p = logs.map(Math.exp);
    return (i: number) => fn(p, i) / (sample.measured[i] ?? 1);
  };
  // The library keeps every step, even one that raises the error, and only remembers the best point; a single
  // bad step into a region where the model is zero everywhere then freezes it (zero Jacobian). So each call makes
  // one step and the accept/reject and damping schedule of classic Levenberg–Marquardt is kept here.
  let logs = start;
  let sse = Infinity;
  let damping = 1e-2;
  let iterations = 0;
  let quietSteps = 0;
  try {
    while (iterations < maxIterations && damping < 1e9) {
      const out = levenbergMarquardt({ x: xs, y: ys }, model, {
        initialValues: logs,
        minValues: bounds.min,
        maxValues: bounds.max,
        damping,
        gradientDifference: 1e-5,
        centralDifference: true,
        maxIterations: 1,
        errorTolerance: 1e-14,
      });
      iterations++;
      if (!Number.isFinite(sse)) sse = Number.isFinite(out.parameterError) ? out.parameterError : Infinity;
      if (!Number.isFinite(sse)) break;
      const gain = sse - out.parameterError;
      if (Number.isFinite(out.parameterError) && gain > 0 && out.parameterValues.some((v, k) => v !== logs[k])) {
        logs = out.parameterValues;
        sse = out.parameterError;
        damping = Math.max(damping / 9, 1e-9);
        quietSteps = gain < 1e-9 * sse ? quietSteps + 1 : 0;
        if (quietSteps >= 3) break;
      } else {
        damping *= 11;
      }
    }
  } catch {
    // The solver throws on singular or non-finite normal equations; another start may still succeed.
  }
  return Number.isFinite(sse) ? { logs, sse, iterations } : null;
}

const triodeFn =
  (sample: Sample): CurrentFn =>
  (p, i) =>
    korenTriodeCurrent(
      { mu: p[0] ?? 1, ex: p[1] ?? 1, kg1: p[2] ?? 1, kp: p[3] ?? 1, kvb: p[4] ?? 1 },
      sample.va[i] ?? 0,
      sample.vg[i] ?? 0,
    );

const pentodePlateFn =
  (sample: Sample): CurrentFn =>
  (p, i) =>
    korenPentodePlateCurrent(
      { mu: p[0] ?? 1, ex: p[1] ?? 1, kg1: p[2] ?? 1, kg2: PLACEHOLDER_KG2, kp: p[3] ?? 1, kvb: p[4] ?? 1 },
      sample.va[i] ?? 0,
      sample.vg[i] ?? 0,
      sample.vg2[i] ?? 0,
    );

type CoreFit = { logs: number[]; iterations: number; starts: number };

function multiStartFit(
  sample: Sample,
  fn: CurrentFn,
  starts: StartCandidate[],
  bounds: Bounds,
  opts: FitOptions,
): CoreFit {
  const maxIterations = opts.maxIterations ?? DEFAULT_MAX_ITERATIONS;
  let best: LmOutcome | null = null;
  let iterations = 0;
  opts.onProgress?.(0.1);
  starts.forEach((start, k) => {
    const out = runLm(sample, fn, start.logs, bounds, maxIterations);
    if (out) {
      iterations += out.iterations;
      if (!best || out.sse < best.sse) best = out;
    }
    opts.onProgress?.(0.1 + (0.85 * (k + 1)) / starts.length);
  });
  const winner = best as LmOutcome | null;
  if (!winner) throw new CurveFitError('The fit did not converge from any starting point.');
  return { logs: winner.logs, iterations, starts: starts.length };
}

function requireEnough(sample: Sample, what: string): void {
  if (sample.count < MIN_FIT_POINTS) {
    throw new CurveFitError(
      `Only ${sample.count} ${what} points have Va > 0 and a current above the floor; at least ${MIN_FIT_POINTS} are needed.`,
    );
  }
}

const TRIODE_MU_GRID = [2, 3, 4.5, 7, 10, 15, 22, 33, 50, 70, 100, 140];
const PENTODE_MU_GRID = [3, 5, 7, 9, 11, 14, 18, 24, 32, 45];

/** Fits Koren's triode model (factor-2 convention) to measured plate curves. */
export function fitKorenTriode(points: readonly CurvePoint[], opts: FitOptions = {}): TriodeFitResult {
  const t0 = opts.now?.();
  const { sample, skipped } = selectSample(points, (p) => p.plateCurrent, opts.currentFloor);
  requireEnough(sample, 'plate-current');
  const fitSample = thin(sample, opts.maxFitPoints ?? DEFAULT_MAX_FIT_POINTS);
  const fitFn = triodeFn(fitSample);
  const starts = gridStarts(fitSample, fitFn, [300], TRIODE_MU_GRID, estimateMuFromCurves(points), TRIODE_BOUNDS);
  const core = multiStartFit(fitSample, fitFn, starts, TRIODE_BOUNDS, opts);
  const fn = triodeFn(sample);
  const [mu, ex, kg1, kp, kvb] = core.logs.map(Math.exp);
  const parameters: KorenTriodeParams = { mu: mu ?? 0, ex: ex ?? 0, kg1: kg1 ?? 0, kp: kp ?? 0, kvb: kvb ?? 0 };
  const q = quality(ratios(sample, fn, [parameters.mu, parameters.ex, parameters.kg1, parameters.kp, parameters.kvb]));
  opts.onProgress?.(1);
  const t1 = opts.now?.();
  return {
    model: 'koren-triode',
    parameters,
    ...q,
    skippedCount: skipped,
    iterations: core.iterations,
    starts: core.starts,
    ...(t0 !== undefined && t1 !== undefined ? { elapsedMs: t1 - t0 } : {}),
    notes: [...thinningNote(fitSample, sample), ...boundNotes(core.logs, TRIODE_BOUNDS)],
  };
}

/**
 * Fits Koren's pentode model: MU, EX, KG1, KP, KVB from plate current, then KG2 from screen current
 * (closed form, given MU and EX) when the data has screen currents.
 */
export function fitKorenPentode(points: readonly CurvePoint[], opts: FitOptions = {}): PentodeFitResult {
  const t0 = opts.now?.();
  if (points.some((p) => p.screenVoltage === undefined)) {
    throw new CurveFitError('A pentode fit needs the screen voltage on every point.');
  }
  const { sample, skipped } = selectSample(points, (p) => p.plateCurrent, opts.currentFloor);
  requireEnough(sample, 'plate-current');
  const fitSample = thin(sample, opts.maxFitPoints ?? DEFAULT_MAX_FIT_POINTS);
  const fitFn = pentodePlateFn(fitSample);
  const starts = gridStarts(fitSample, fitFn, [5, 20, 60], PENTODE_MU_GRID, null, PENTODE_BOUNDS);
  const core = multiStartFit(fitSample, fitFn, starts, PENTODE_BOUNDS, opts);
  const fn = pentodePlateFn(sample);
  const [mu = 0, ex = 0, kg1 = 0, kp = 0, kvb = 0] = core.logs.map(Math.exp);
  const q = quality(ratios(sample, fn, [mu, ex, kg1, kp, kvb]));

  const notes = [...thinningNote(fitSample, sample), ...boundNotes(core.logs, PENTODE_BOUNDS)];
  let kg2 = PLACEHOLDER_KG2;
  let kg2Fitted = false;
  let screen: FitQuality | undefined;
  const withScreen = points.filter((p) => p.screenCurrent !== undefined);
  if (withScreen.length > 0) {
    const sel = selectSample(withScreen, (p) => p.screenCurrent, undefined);
    const s = sel.sample;
    const screenFn: CurrentFn = (_p, i) =>
      korenPentodeScreenCurrent({ mu, ex, kg1, kg2: 1, kp, kvb }, s.vg[i] ?? 0, s.vg2[i] ?? 0);
    const r = ratios(s, screenFn, []);
    const c = bestScale(r);
    if (s.count >= 3 && c > 0) {
      kg2 = 1 / c;
      kg2Fitted = true;
      for (let i = 0; i < r.length; i++) r[i] = (r[i] ?? 0) * c;
      screen = quality(r);
    } else {
      notes.push(`Too few usable screen-current points; KG2 left at the placeholder ${PLACEHOLDER_KG2}.`);
    }
  } else {
    notes.push(`No screen currents in the data; KG2 left at the placeholder ${PLACEHOLDER_KG2}. Do not trust screen currents from this model.`);
  }
  const screenVoltages = new Set(points.map((p) => p.screenVoltage));
  if (screenVoltages.size === 1) {
    notes.push('All points share one screen voltage, so MU is only constrained through cutoff; treat it as approximate.');
  }
  opts.onProgress?.(1);
  const t1 = opts.now?.();
  return {
    model: 'koren-pentode',
    parameters: { mu, ex, kg1, kg2, kp, kvb },
    ...q,
    kg2Fitted,
    ...(screen ? { screen } : {}),
    skippedCount: skipped,
    iterations: core.iterations,
    starts: core.starts,
    ...(t0 !== undefined && t1 !== undefined ? { elapsedMs: t1 - t0 } : {}),
    notes,
  };
}

export function fitCurves(model: FitModel, points: readonly CurvePoint[], opts: FitOptions = {}): FitResult {
  return model === 'koren-triode' ? fitKorenTriode(points, opts) : fitKorenPentode(points, opts);
}

export type FittedCurve = { gridVoltage: number; points: { plateVoltage: number; plateCurrent: number }[] };

export type FittedCurveOptions = {
  /** Samples per curve, Va from 0 to vaMax inclusive. Default 81. */
  samples?: number;
  /** Required for pentodes: the screen voltage the curves are drawn at. */
  screenVoltage?: number;
};

/** Model curves (A) to draw over the measured points, one per grid voltage. */
export function fittedCurves(
  model: FitModel,
  parameters: KorenTriodeParams | KorenPentodeParams,
  gridVoltages: readonly number[],
  vaMax: number,
  options: FittedCurveOptions = {},
): FittedCurve[] {
  const samples = Math.max(2, Math.round(options.samples ?? 81));
  let current: (va: number, vg: number) => number;
  if (model === 'koren-pentode') {
    const vg2 = options.screenVoltage;
    if (vg2 === undefined) throw new RangeError('fittedCurves: a pentode needs options.screenVoltage.');
    if (!('kg2' in parameters)) throw new RangeError('fittedCurves: pentode parameters need kg2.');
    current = (va, vg) => korenPentodePlateCurrent(parameters, va, vg, vg2);
  } else {
    current = (va, vg) => korenTriodeCurrent(parameters, va, vg);
  }
  return gridVoltages.map((vg) => ({
    gridVoltage: vg,
    points: Array.from({ length: samples }, (_, k) => {
      const va = (vaMax * k) / (samples - 1);
      return { plateVoltage: va, plateCurrent: current(va, vg) };
    }),
  }));
}
