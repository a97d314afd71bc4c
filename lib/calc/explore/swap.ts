// Tube swap: the same stage with another library type in the socket, and the parts that would have to change to
// keep it within its ratings.
import { CalcError } from '../errors';
import { analyzeStage } from '../index';
import type { StageInput, Tube } from '../input';
import { brent } from '../solve';
import type { RatingCheck, StageAnalysis } from '../types';
import { getPath, setPath } from './parts';
import { nearestSeriesValue } from './series';

export type SwapCandidate = { tubeId: number; designation: string; tube: Tube };

export type SwapChange = {
  path: string;
  label: string;
  from: number;
  /** nearest E24 value of the solved part */
  to: number;
  unit: 'Ω' | 'V';
  reason: string;
  /** the stage with that change: plate current and plate dissipation as % of rating */
  plateCurrent: number;
  plateDissipationPercent: number | null;
};

export type SwapRow = {
  tubeId: number;
  designation: string;
  /** the stage's own tube */
  current: boolean;
  error: { code: string; message: string } | null;
  plateCathodeVoltage: number | null;
  plateCurrent: number | null;
  gridCathodeVoltage: number | null;
  gain: number | null;
  headroom: number | null;
  thd: number | null;
  outputPower: number | null;
  plateDissipation: number | null;
  plateDissipationPercent: number | null;
  worstStatus: RatingCheck['status'] | null;
  ratingsOver: string[];
  changes: SwapChange[];
};

const STATUS_ORDER = { 'not-checked': 0, ok: 1, near: 2, over: 3 } as const;

export function worstStatus(ratings: RatingCheck[]): RatingCheck['status'] | null {
  let worst: RatingCheck['status'] | null = null;
  for (const r of ratings) if (worst === null || STATUS_ORDER[r.status] > STATUS_ORDER[worst]) worst = r.status;
  return worst;
}

/** Whether the tube can sit in this topology at all (the engine's own rule: pentode amplifier needs a pentode model). */
export function fitsTopology(input: StageInput, tube: Tube): boolean {
  if (input.topology === 'pentode-amplifier') return tube.model === 'koren-pentode';
  if (input.topology === 'common-cathode' || input.topology === 'cathode-follower') return tube.model !== 'koren-pentode';
  if (tube.model === 'koren-pentode') return Boolean((input as { screen?: unknown }).screen);
  return true;
}

const pdPercent = (a: StageAnalysis) => a.ratings.find((r) => r.key === 'plate-dissipation')?.percent ?? null;

function idle(input: StageInput): StageAnalysis | null {
  try {
    return analyzeStage({ ...input, drive: { ...input.drive, amplitude: 0 } } as StageInput, { quick: true });
  } catch {
    return null;
  }
}

function opOnly(input: StageInput): StageAnalysis | null {
  try {
    return analyzeStage(input, { quick: true, operatingPointOnly: true });
  } catch {
    return null;
  }
}

/** Solves part `path` (searched on a log scale within [lo, hi]) so that `f(analysis)` reaches zero; null without a bracket. */
function solvePart(input: StageInput, path: string, lo: number, hi: number, f: (a: StageAnalysis) => number): number | null {
  const g = (logx: number) => {
    const a = opOnly(setPath(input, path, Math.exp(logx)));
    return a ? f(a) : NaN;
  };
  // sample the range to find a sign change that has analyses on both sides
  const n = 12;
  let prevX = Math.log(lo);
  let prevG = g(prevX);
  for (let k = 1; k <= n; k++) {
    const x = Math.log(lo) + ((Math.log(hi) - Math.log(lo)) * k) / n;
    const gx = g(x);
    if (Number.isFinite(prevG) && Number.isFinite(gx) && prevG * gx <= 0) return Math.exp(brent(g, prevX, x, 1e-6, 60));
    prevX = x;
    prevG = gx;
  }
  return null;
}

function changeRow(input: StageInput, path: string, label: string, solved: number, reason: string): SwapChange | null {
  const from = getPath(input, path) as number;
  const to = nearestSeriesValue('E24', solved);
  const a = idle(setPath(input, path, to));
  if (!a) return null;
  return { path, label, from, to, unit: 'Ω', reason, plateCurrent: a.operatingPoint.plateCurrent, plateDissipationPercent: pdPercent(a) };
}

/** Parts to change for this tube: the bias for the stage's original current, and a safe plate dissipation. */
export function suggestChanges(input: StageInput, analysis: StageAnalysis, targetCurrent: number): SwapChange[] {
  const changes: SwapChange[] = [];
  const ia = analysis.operatingPoint.plateCurrent;
  const bias = (input as { bias?: { kind: string } }).bias;
  const pd = analysis.ratings.find((r) => r.key === 'plate-dissipation');
  const pdLimit = pd?.limit ?? null;
  const safePd = pdLimit !== null ? input.derating * pdLimit : null;
  if (bias?.kind === 'cathode' && Math.abs(ia - targetCurrent) > 0.05 * targetCurrent) {
    const rk = getPath(input, 'bias.cathodeResistor') as number;
    const solved = solvePart(input, 'bias.cathodeResistor', rk / 30, rk * 30, (a) => Math.log(a.operatingPoint.plateCurrent / targetCurrent));
    const row = solved !== null ? changeRow(input, 'bias.cathodeResistor', 'Cathode resistor', solved, 'same plate current as the stage’s own tube') : null;
    if (row) changes.push(row);
  }
  if (safePd !== null && pd && pd.value > safePd) {
    const hasPlateResistor = input.topology === 'common-cathode' || input.topology === 'pentode-amplifier';
    if (hasPlateResistor) {
      const rp = getPath(input, 'plateResistor') as number;
      const solved = solvePart(input, 'plateResistor', rp, rp * 30, (a) => a.operatingPoint.plateDissipation - safePd);
      const row = solved !== null ? changeRow(input, 'plateResistor', 'Plate resistor', solved, `plate dissipation at ${Math.round(input.derating * 100)} % of rating`) : null;
      if (row) changes.push(row);
    } else if (bias?.kind === 'cathode') {
      const rk = getPath(input, 'bias.cathodeResistor') as number;
      const solved = solvePart(input, 'bias.cathodeResistor', rk, rk * 30, (a) => a.operatingPoint.plateDissipation - safePd);
      const row = solved !== null ? changeRow(input, 'bias.cathodeResistor', 'Cathode resistor', solved, `plate dissipation at ${Math.round(input.derating * 100)} % of rating`) : null;
      if (row) changes.push(row);
    }
  }
  return changes;
}

function rowOf(c: SwapCandidate, current: boolean, a: StageAnalysis | null, err: unknown, changes: SwapChange[]): SwapRow {
  if (!a) {
    const e = err instanceof CalcError ? { code: err.code, message: err.message } : { code: 'no-solution', message: 'The stage could not be analysed with this tube.' };
    return {
      tubeId: c.tubeId, designation: c.designation, current, error: e, plateCathodeVoltage: null, plateCurrent: null, gridCathodeVoltage: null,
      gain: null, headroom: null, thd: null, outputPower: null, plateDissipation: null, plateDissipationPercent: null, worstStatus: null, ratingsOver: [], changes,
    };
  }
  return {
    tubeId: c.tubeId,
    designation: c.designation,
    current,
    error: null,
    plateCathodeVoltage: a.operatingPoint.plateCathodeVoltage,
    plateCurrent: a.operatingPoint.plateCurrent,
    gridCathodeVoltage: a.operatingPoint.gridCathodeVoltage,
    gain: a.smallSignal.gain,
    headroom: a.largeSignal.headroom.maxDrive,
    thd: a.largeSignal.drive > 0 ? a.largeSignal.thdPercent : null,
    outputPower: a.largeSignal.outputPower,
    plateDissipation: a.operatingPoint.plateDissipation,
    plateDissipationPercent: pdPercent(a),
    worstStatus: worstStatus(a.ratings),
    ratingsOver: a.ratings.filter((r) => r.status === 'over').map((r) => r.label),
    changes,
  };
}

/**
 * One row per candidate: the stage analysed (full analysis, as the stage editor does) with the candidate's tube in
 * place of its own, and the part changes that restore the original current or a safe plate dissipation.
 * `currentTubeId` marks the stage's own type.
 */
export function tubeSwap(input: StageInput, candidates: SwapCandidate[], currentTubeId?: number): SwapRow[] {
  const base = analyzeStage(input);
  const target = base.operatingPoint.plateCurrent;
  const rows: SwapRow[] = [];
  for (const c of candidates) {
    if (!fitsTopology(input, c.tube)) continue;
    const swapped = { ...input, tube: c.tube } as StageInput;
    let a: StageAnalysis | null = null;
    let err: unknown = null;
    try {
      a = analyzeStage(swapped);
    } catch (e) {
      err = e;
    }
    let changes: SwapChange[] = [];
    if (a && c.tubeId !== currentTubeId) changes = suggestChanges(swapped, a, target);
    rows.push(rowOf(c, c.tubeId === currentTubeId, a, err, changes));
  }
  return rows;
}
