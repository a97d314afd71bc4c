// Tolerance runs of a whole signal chain: every stage's parts and tube vary, the mains moves the raw B+, and the
// supply ladder is re-solved for each build. Per build the node voltages are the fixed point's second iterate —
// stage currents at the nominal solved node voltages scaled by the mains, the ladder solved for those currents,
// then the stages analysed (with drive) at the resulting voltages — which for the usual dropping resistors is
// within a small fraction of a volt of the converged supply and costs two analyses per stage instead of many.
import { solveChain, solveLadder, stageSupplyCurrent, type ChainStage, type ChainSupply } from '../chain';
import { CalcError } from '../errors';
import { analyzeStage } from '../index';
import type { StageInput } from '../input';
import type { StageAnalysis } from '../types';
import { metricValue, METRIC_BY_KEY, type MetricKey } from './metrics';
import { getPath, scaleEmission, scaleMains, setPath, stageParts } from './parts';
import { createRng, drawFactor } from './random';
import { describe, spearmanMatrix } from './stats';
import {
  DEFAULT_CAPACITOR_TOLERANCE,
  DEFAULT_MAINS_VARIATION,
  DEFAULT_RESISTOR_TOLERANCE,
  DEFAULT_TUBE_SPREAD,
  type ToleranceOptions,
  type ToleranceSummary,
  type VariedPart,
} from './tolerance';

const STAGE_METRICS: MetricKey[] = ['plateCurrent', 'plateDissipationShare', 'gain', 'headroom', 'thd', 'outputPower', 'splitterBalance'];

export type ChainToleranceSetup = {
  trials: number;
  seed: number;
  distribution: 'normal' | 'uniform';
  mains: { minus: number; plus: number };
  tubeSpread: number;
  supply: ChainSupply;
  stages: {
    id: number;
    name: string;
    input: StageInput;
    parts: VariedPart[];
    /** index of its supply node, −1 when it keeps its own supply */
    node: number;
    nominalSupply: number;
    metrics: MetricKey[];
  }[];
  /** metric columns: per stage metrics, then the chain's total gain and first-clip input */
  columns: { key: string; label: string; unit: string; nominal: number | null }[];
  factors: { key: string; label: string }[];
};

export function prepareChainTolerance(chain: ChainStage[], supply: ChainSupply, options: ToleranceOptions): ChainToleranceSetup {
  const solved = solveChain(chain, supply, { inputRms: 0.1 });
  const nodes = supply.nodes ?? [];
  const rTol = options.resistorTolerance ?? DEFAULT_RESISTOR_TOLERANCE;
  const cTol = options.capacitorTolerance ?? DEFAULT_CAPACITOR_TOLERANCE;
  const stages: ChainToleranceSetup['stages'] = [];
  const columns: ChainToleranceSetup['columns'] = [];
  const factors: ChainToleranceSetup['factors'] = [];
  // the nominal chain gain and first-clip input, worked out as each build's are (stage gains with their own loads)
  let cumulative = 1;
  let clip = Infinity;
  for (const s of [...chain].sort((a, b) => a.position - b.position)) {
    if (!s.input) continue;
    const r = solved.stages.find((x) => x.stageId === s.id);
    const supplyV = r?.solvedSupply ?? s.input.supply;
    const input = { ...s.input, supply: supplyV } as StageInput;
    let nominal: StageAnalysis;
    try {
      nominal = analyzeStage(input, { quick: true });
    } catch {
      continue;
    }
    const parts = stageParts(input).map((p) => {
      const key = `${s.id}:${p.path}`;
      const band = options.parts?.[key] ?? (p.kind === 'resistor' ? { minus: rTol, plus: rTol } : cTol);
      return { ...p, ...band, source: options.parts?.[key] ? ('entered' as const) : ('common practice' as const) };
    });
    const hr = nominal.largeSignal.headroom;
    if (hr.limitedBy !== 'none') clip = Math.min(clip, hr.maxDrive / Math.SQRT2 / Math.max(cumulative, 1e-12));
    cumulative *= Math.abs(nominal.smallSignal.gain);
    const metrics = STAGE_METRICS.filter((k) => Number.isFinite(metricValue(nominal, k)));
    const node = r?.solvedSupply != null && s.supplyNode !== null ? nodes.findIndex((n) => n.key === s.supplyNode) : -1;
    stages.push({ id: s.id, name: s.name, input, parts, node, nominalSupply: supplyV, metrics });
    for (const p of parts) factors.push({ key: `${s.id}:${p.path}`, label: `${s.name}: ${p.label}` });
    factors.push({ key: `${s.id}:tube`, label: `${s.name}: tube (emission)` });
    for (const k of metrics) columns.push({ key: `${s.id}:${k}`, label: `${s.name}: ${METRIC_BY_KEY[k].label}`, unit: METRIC_BY_KEY[k].unit, nominal: metricValue(nominal, k) });
  }
  if (stages.length === 0) throw new CalcError('invalid-input', 'No stage of this chain can be analysed.');
  factors.push({ key: 'mains', label: 'Mains (supply voltages)' });
  columns.push({ key: 'chain:gain', label: 'Chain gain (magnitude)', unit: '', nominal: cumulative });
  columns.push({ key: 'chain:clipInput', label: 'Chain input at first clip (rms)', unit: 'V', nominal: Number.isFinite(clip) ? clip : null });
  return {
    trials: options.trials,
    seed: options.seed | 0,
    distribution: options.distribution ?? 'normal',
    mains: options.mains ?? DEFAULT_MAINS_VARIATION,
    tubeSpread: options.tubeSpread ?? DEFAULT_TUBE_SPREAD,
    supply,
    stages,
    columns,
    factors,
  };
}

export type ChainTrialBlock = { from: number; to: number; factors: Float64Array[]; metrics: Float64Array[]; overRating: Uint8Array; failures: Record<string, number> };

const idleOf = (input: StageInput) => analyzeStage(input, { quick: true, operatingPointOnly: true });

export function runChainTrials(setup: ChainToleranceSetup, from: number, to: number): ChainTrialBlock {
  const n = Math.max(0, to - from);
  const block: ChainTrialBlock = {
    from,
    to,
    factors: setup.factors.map(() => new Float64Array(n)),
    metrics: setup.columns.map(() => new Float64Array(n).fill(NaN)),
    overRating: new Uint8Array(n),
    failures: {},
  };
  const nodes = setup.supply.nodes ?? [];
  for (let i = 0; i < n; i++) {
    const rng = createRng(setup.seed, from + i);
    let fc = 0;
    const inputs = setup.stages.map((s) => {
      let input = s.input;
      for (const p of s.parts) {
        const f = drawFactor(rng, p.minus, p.plus, setup.distribution);
        (block.factors[fc++] as Float64Array)[i] = f;
        input = setPath(input, p.path, (getPath(s.input, p.path) as number) * f);
      }
      const t = drawFactor(rng, setup.tubeSpread, setup.tubeSpread, setup.distribution);
      (block.factors[fc++] as Float64Array)[i] = t;
      return { ...input, tube: scaleEmission(input.tube, t) } as StageInput;
    });
    const mains = drawFactor(rng, setup.mains.minus, setup.mains.plus, setup.distribution);
    (block.factors[fc++] as Float64Array)[i] = mains;
    try {
      // supply: one ladder correction from the mains-scaled nominal node voltages
      const supplies = setup.stages.map((s) => s.nominalSupply * mains);
      if (nodes.length && typeof setup.supply.rawVoltage === 'number') {
        const currents = new Array<number>(nodes.length).fill(0);
        setup.stages.forEach((s, k) => {
          if (s.node < 0) return;
          const input = scaleMains(inputs[k] as StageInput, mains);
          currents[s.node] = (currents[s.node] as number) + stageSupplyCurrent(input, idleOf(input));
        });
        const volts = solveLadder({ rawVoltage: setup.supply.rawVoltage * mains, sourceResistance: setup.supply.sourceResistance ?? 0, nodes }, currents).voltages;
        setup.stages.forEach((s, k) => {
          if (s.node >= 0) supplies[k] = volts[s.node] as number;
        });
      }
      let col = 0;
      let cumulative = 1;
      let clip = Infinity;
      setup.stages.forEach((s, k) => {
        const scaled = scaleMains(inputs[k] as StageInput, mains);
        const a = analyzeStage({ ...scaled, supply: supplies[k] } as StageInput, { quick: true });
        for (const key of s.metrics) (block.metrics[col++] as Float64Array)[i] = metricValue(a, key);
        if (a.ratings.some((r) => r.status === 'over')) block.overRating[i] = 1;
        const hr = a.largeSignal.headroom;
        if (hr.limitedBy !== 'none') clip = Math.min(clip, hr.maxDrive / Math.SQRT2 / Math.max(cumulative, 1e-12));
        cumulative *= Math.abs(a.smallSignal.gain);
      });
      (block.metrics[col++] as Float64Array)[i] = cumulative;
      (block.metrics[col++] as Float64Array)[i] = Number.isFinite(clip) ? clip : NaN;
    } catch (e) {
      const code = e instanceof CalcError ? e.code : 'no-solution';
      block.failures[code] = (block.failures[code] ?? 0) + 1;
      for (const m of block.metrics) m[i] = NaN;
    }
  }
  return block;
}

export function summarizeChainTolerance(setup: ChainToleranceSetup, blocksIn: ChainTrialBlock[]): ToleranceSummary {
  const blocks = [...blocksIn].sort((a, b) => a.from - b.from);
  const join = (pick: (b: ChainTrialBlock) => Float64Array) => {
    const out = new Float64Array(blocks.reduce((s, b) => s + pick(b).length, 0));
    let o = 0;
    for (const b of blocks) {
      out.set(pick(b), o);
      o += pick(b).length;
    }
    return out;
  };
  const factors = setup.factors.map((_, c) => join((b) => b.factors[c] as Float64Array));
  const metrics = setup.columns.map((_, c) => join((b) => b.metrics[c] as Float64Array));
  const total = factors[0]?.length ?? 0;
  const failures: Record<string, number> = {};
  let over = 0;
  for (const b of blocks) {
    for (const [k, v] of Object.entries(b.failures)) failures[k] = (failures[k] ?? 0) + v;
    for (const x of b.overRating) over += x;
  }
  const failed = Object.values(failures).reduce((s, v) => s + v, 0);
  const analysed = Math.max(1, total - failed);
  const rho = spearmanMatrix(factors, metrics);
  return {
    trials: setup.trials,
    completed: total,
    failed,
    failures,
    seed: setup.seed,
    distribution: setup.distribution,
    parts: setup.stages.flatMap((s) => s.parts.map((p) => ({ path: `${s.id}:${p.path}`, label: `${s.name}: ${p.label}`, kind: p.kind, nominal: p.nominal, minus: p.minus, plus: p.plus, source: p.source }))),
    mains: setup.mains,
    tubeSpread: setup.tubeSpread,
    metrics: setup.columns.map((c, k) => ({ key: c.key as MetricKey, label: c.label, unit: c.unit, nominal: c.nominal, stats: describe(metrics[k] as Float64Array) })),
    overRatingShare: over / analysed,
    overByRating: [],
    outsideBenchShare: 0,
    outsideByBench: [],
    sensitivity: setup.columns.map((c, k) => {
      const rhos = setup.factors.map((f, j) => ({ factor: f.key, label: f.label, rho: (rho[k] as number[])[j] as number }));
      const sum = rhos.reduce((s, r) => s + r.rho * r.rho, 0);
      return { metric: c.key as MetricKey, ranking: rhos.map((r) => ({ ...r, share: sum > 0 ? (r.rho * r.rho) / sum : 0 })).sort((a, b) => Math.abs(b.rho) - Math.abs(a.rho)) };
    }),
  };
}
