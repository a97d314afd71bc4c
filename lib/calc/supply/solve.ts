// The supply solver: periodic steady state at idle and at full drive, the switch-on transient, the mains range,
// and the ratings. Pure (no I/O).
import { CalcError } from '../errors';
import { integrate, newRecord, pathDrop, steadyState, workspace, type DropLaw, type HalfCycleRecord, type Source, type Workspace } from './cycle';
import { buildNetwork, discretise, loadTerm, type Discretisation, type Network } from './network';
import { siliconDiode, THERMAL_VOLTAGE_27C, vacuumPerveance, vacuumRectifier } from './rectifiers';
import type {
  RectifierSummary,
  SupplyChokeResult,
  SupplyCircuit,
  SupplyNodeResult,
  SupplyOperatingResult,
  SupplyOptions,
  SupplyRatingCheck,
  SupplyRatingStatus,
  SupplyResult,
  SupplyWaveform,
} from './types';

export const DEFAULT_STEPS = 256;
export const DEFAULT_VARIATION = 0.1;
export const DEFAULT_SUPPLY_DERATING = 0.8;

export type PreparedSupply = {
  circuit: SupplyCircuit;
  net: Network;
  disc: Discretisation;
  /** coarser step for the switch-on transient, built on first use */
  coarse?: Discretisation;
  steps: number;
  frequency: number;
  variation: number;
  source: Source;
  rectifier: Omit<RectifierSummary, 'peakCurrent' | 'averageCurrent' | 'idlePeakCurrent' | 'fullDrivePeakCurrent' | 'perDevicePeakCurrent' | 'perDeviceAverageCurrent' | 'peakInverseVoltage' | 'turnOnPeakCurrent'>;
  limits: { piv: number | null; peakPerDevice: number | null; averagePerDevice: number | null; dcTotal: number | null; surge: number | null; maxReservoir: number | null };
  wsp: Workspace;
  /** last steady state per load case, reused as the next Newton start */
  warm: Map<string, Float64Array>;
};

/** Builds the network and the step matrices once; reuse it across calls with different load currents. */
export function prepareSupply(circuit: SupplyCircuit, options: SupplyOptions = {}): PreparedSupply {
  const mains = circuit.mains;
  if (!mains || (mains.frequency !== 50 && mains.frequency !== 60)) throw new CalcError('invalid-input', 'The mains frequency must be 50 or 60 Hz.');
  if (!(mains.voltage > 0)) throw new CalcError('invalid-input', 'The mains voltage must be a positive number.');
  const variation = mains.variation ?? DEFAULT_VARIATION;
  if (!(variation >= 0 && variation < 0.5)) throw new CalcError('invalid-input', 'The mains variation must be between 0 and 50 %.');
  const sec = circuit.secondary;
  if (!sec || !(sec.voltage > 0)) throw new CalcError('invalid-input', 'The secondary voltage must be a positive number.');
  if (!(sec.resistance >= 0)) throw new CalcError('invalid-input', 'The winding resistance must be zero or more.');
  const steps = Math.round(options.stepsPerHalfCycle ?? DEFAULT_STEPS);
  if (!(steps >= 16 && steps <= 20000)) throw new CalcError('invalid-input', 'Steps per half cycle must be between 16 and 20000.');
  const net = buildNetwork(circuit);
  const frequency = mains.frequency;
  const omega = 2 * Math.PI * frequency;
  const h = 1 / (2 * frequency) / steps;
  const disc = discretise(net, h);
  // primary resistance referred to the secondary path: R·(Vpath/Vmains)²
  const ratio = sec.voltage / mains.voltage;
  const referred = (sec.primaryResistance ?? 0) * ratio * ratio;
  const resistance = sec.resistance + referred;

  const kind = circuit.rectifier?.kind;
  let law: DropLaw;
  let rectifier: PreparedSupply['rectifier'];
  let limits: PreparedSupply['limits'];
  if (kind === 'silicon-bridge' || kind === 'silicon-centre-tap') {
    const dd = siliconDiode(circuit.rectifier.type);
    const junctions = kind === 'silicon-bridge' ? 2 : 1;
    law = { kind: 'diode', is: dd.is, nvt: dd.n * THERMAL_VOLTAGE_27C, rs: dd.rs, junctions };
    rectifier = {
      kind,
      type: dd.type,
      label: `${kind === 'silicon-bridge' ? 'Silicon bridge' : 'Full-wave centre tap'}, ${dd.label}`,
      heater: null,
      law: { kind: 'diode', is: dd.is, n: dd.n, rs: dd.rs, series: junctions },
      sources: dd.sources,
    };
    limits = { piv: dd.maxReverseVoltage, peakPerDevice: null, averagePerDevice: dd.maxAverageCurrent, dcTotal: null, surge: dd.maxSurgeCurrent, maxReservoir: null };
  } else if (kind === 'vacuum') {
    const vr = vacuumRectifier(circuit.rectifier.type);
    const k = vacuumPerveance(vr);
    law = { kind: 'vacuum', k, p: vr.exponent };
    rectifier = { kind, type: vr.type, label: `Vacuum full-wave, ${vr.label}`, heater: { ...vr.heater }, law: { kind: 'vacuum', k, p: vr.exponent }, sources: vr.sources };
    limits = { piv: vr.maxPeakInverseVoltage, peakPerDevice: vr.maxPeakCurrent, averagePerDevice: null, dcTotal: vr.maxDcCurrent, surge: null, maxReservoir: vr.maxReservoir };
  } else {
    throw new CalcError('invalid-input', "The rectifier kind must be 'silicon-bridge', 'silicon-centre-tap' or 'vacuum'.");
  }
  const source: Source = { peak: Math.SQRT2 * sec.voltage, omega, resistance, law };
  return { circuit, net, disc, steps, frequency, variation, source, rectifier, limits, wsp: workspace(net.n), warm: new Map() };
}

/** DC starting point from the hand estimates; Newton corrects it. */
function initialGuess(p: PreparedSupply, currents: number[], peak: number): Float64Array {
  const { net, source, frequency } = p;
  const m = net.n + 1;
  const y = new Float64Array(m);
  const through = new Array<number>(net.k).fill(0);
  for (let j = net.k - 1; j >= 0; j--) through[j] = currents[j]! + net.conductance[j]! * peak * 0.9 + (j + 1 < net.k ? through[j + 1]! : 0);
  const total = through[0]!;
  let v: number;
  if (net.capacitorInput) {
    const ipk = Math.max(4 * total, 1e-6);
    v = peak - 0.5 * source.resistance * ipk - pathDrop(source.law, ipk) - total / (4 * frequency * net.capacitance[0]!);
  } else {
    const br = net.branchInto[0]!;
    v = (2 * peak) / Math.PI - (source.resistance + br.resistance) * total - pathDrop(source.law, total);
    // below the critical inductance (common practice R/(3ω)) the output rises toward the peak
    const crit = total > 0 ? v / total / (6 * Math.PI * frequency) : Infinity;
    if (br.inductance < crit) v = 0.9 * peak;
  }
  v = Math.max(v, 0.05 * peak);
  y[0] = v;
  for (let j = 1; j < net.k; j++) {
    const br = net.branchInto[j]!;
    v = Math.max(v - br.resistance * through[j]!, 0.01 * peak);
    y[j] = v;
  }
  for (const br of net.branchInto) if (br && br.state >= 0) y[br.state] = through[br.into]!;
  if (!net.capacitorInput) y[net.n] = -source.resistance * total - pathDrop(source.law, total);
  return y;
}

function scaleOf(p: PreparedSupply, currents: number[]): Float64Array {
  const m = p.net.n + 1;
  const s = new Float64Array(m);
  const total = currents.reduce((a, b) => a + b, 0);
  const iScale = Math.max(total, p.source.peak / 1e4, 1e-3);
  for (let i = 0; i < m; i++) s[i] = i < p.net.k ? p.source.peak : iScale;
  if (!p.net.capacitorInput) s[m - 1] = p.source.peak;
  return s;
}

type Solved = { record: HalfCycleRecord; iterations: number; currents: number[] };

function solveCase(p: PreparedSupply, currents: number[], peakFactor: number, tag: string, from?: { tag: string; factor: number }): Solved {
  const src: Source = { ...p.source, peak: p.source.peak * peakFactor };
  const bd = loadTerm(p.net, p.disc, currents);
  const base = from ? p.warm.get(from.tag) : undefined;
  const guess = p.warm.get(tag) ?? (base ? base.map((v) => v * from!.factor) : initialGuess(p, currents, src.peak));
  const scale = scaleOf(p, currents);
  const warmStart = p.warm.has(tag) || !!base;
  // a warm start far from the answer (e.g. a choke input going from continuous to discontinuous current) may not
  // settle: then Newton starts again from the hand estimate before plain integration is tried
  const ss =
    (warmStart ? steadyState(p.net, p.disc, bd, src, p.steps, guess, scale, p.wsp, currents[0]!, false) : null) ??
    steadyState(p.net, p.disc, bd, src, p.steps, initialGuess(p, currents, src.peak), scale, p.wsp, currents[0]!)!;
  p.warm.set(tag, ss.y);
  for (let j = 0; j < p.net.k; j++) {
    const v = ss.record.v[j]!;
    for (let i = 0; i < v.length; i++) if (!Number.isFinite(v[i]!)) throw new CalcError('no-solution', 'The supply solution is not finite.');
  }
  return { record: ss.record, iterations: ss.iterations, currents };
}

function stats(v: Float64Array, steps: number): SupplyOperatingResult {
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  let a = 0;
  let b = 0;
  for (let i = 0; i < steps; i++) {
    const x = v[i]!;
    sum += x;
    if (x < min) min = x;
    if (x > max) max = x;
    const th = (2 * Math.PI * i) / steps;
    a += x * Math.cos(th);
    b += x * Math.sin(th);
  }
  const dc = sum / steps;
  let sq = 0;
  for (let i = 0; i < steps; i++) sq += (v[i]! - dc) ** 2;
  const amp = (2 / steps) * Math.hypot(a, b);
  return { dc, ripplePeakToPeak: max - min, rippleRms: Math.sqrt(sq / steps), ripple2fRms: amp / Math.SQRT2, min, max };
}

function rms(v: Float64Array, steps: number): number {
  let sq = 0;
  for (let i = 0; i < steps; i++) sq += v[i]! * v[i]!;
  return Math.sqrt(sq / steps);
}
function mean(v: Float64Array, steps: number): number {
  let s = 0;
  for (let i = 0; i < steps; i++) s += v[i]!;
  return s / steps;
}
function peakOf(v: Float64Array): number {
  let m = 0;
  for (let i = 0; i < v.length; i++) if (v[i]! > m) m = v[i]!;
  return m;
}

function waveformOf(p: PreparedSupply, rec: HalfCycleRecord, cycles: number): SupplyWaveform {
  const halves = Math.max(1, Math.round(2 * cycles));
  const N = p.steps;
  const total = halves * N;
  const every = Math.max(1, Math.ceil(total / 600));
  const last = p.net.k - 1;
  const out: SupplyWaveform = { t: [], reservoir: [], last: [], rectifierCurrent: [] };
  for (let s = 0; s <= total; s += every) {
    const i = s % N;
    out.t.push(s * p.disc.h);
    out.reservoir.push(rec.v[0]![i]!);
    out.last.push(rec.v[last]![i]!);
    out.rectifierCurrent.push(rec.ir[i]!);
  }
  return out;
}

function check(key: string, label: string, value: number, limit: number | null, unit: string, derating: number, caution?: string): SupplyRatingCheck {
  const v = Number.isFinite(value) ? value : 0;
  if (limit === null || !(limit > 0)) return { key, label, value: v, limit: null, unit, percent: null, status: 'not-checked', caution: 'No rating entered; not checked.' };
  const percent = (100 * Math.abs(v)) / limit;
  const status: SupplyRatingStatus = percent > 100 ? 'over' : percent > 100 * derating ? 'near' : 'ok';
  const text =
    status === 'over'
      ? `Exceeds the rated ${label.toLowerCase()}.${caution ? ` ${caution}` : ''}`
      : status === 'near'
        ? `Above ${Math.round(derating * 100)} % of the rating.${caution ? ` ${caution}` : ''}`
        : (caution ?? null);
  return { key, label, value: v, limit, unit, percent, status, caution: text };
}

/** Node DC voltages only, at idle (for iterating against the stages' currents). */
export function supplyNodeVoltages(p: PreparedSupply, currents: number[]): number[] {
  const s = solveCase(p, currents, 1, 'dc');
  return s.record.v.map((v) => mean(v, p.steps));
}

/** Node DC voltages at idle and at full drive for extra per-node currents (no ratings, waveforms or transients). */
export function supplyDc(p: PreparedSupply, extra: { idle: number[]; full: number[] }): { idle: number[]; full: number[] } {
  const idleCurrents = p.net.idle.map((c, j) => c + (extra.idle[j] ?? 0));
  const fullCurrents = p.net.full.map((c, j) => c + (extra.full[j] ?? 0));
  const idle = solveCase(p, idleCurrents, 1, 'idle');
  const idleDc = idle.record.v.map((v) => mean(v, p.steps));
  if (fullCurrents.every((c, j) => c === idleCurrents[j])) return { idle: idleDc, full: idleDc };
  const full = solveCase(p, fullCurrents, 1, 'full', { tag: 'idle', factor: 1 });
  return { idle: idleDc, full: full.record.v.map((v) => mean(v, p.steps)) };
}

/** Full solution with per-node idle and full-drive currents (A per node, added to the circuit's own loads). */
export function solvePrepared(p: PreparedSupply, extra: { idle?: number[]; full?: number[] } = {}, options: SupplyOptions = {}): SupplyResult {
  const { net, steps, frequency, variation } = p;
  const derating = options.derating ?? DEFAULT_SUPPLY_DERATING;
  const idleCurrents = net.idle.map((c, j) => c + (extra.idle?.[j] ?? 0));
  const fullCurrents = net.full.map((c, j) => c + (extra.full?.[j] ?? extra.idle?.[j] ?? 0));
  // extra currents may be negative: a stage taken as a current plus a conductance (see with-stages.ts)
  for (const c of [...idleCurrents, ...fullCurrents]) if (!Number.isFinite(c)) throw new CalcError('invalid-input', 'Load currents must be finite numbers.');
  const idle = solveCase(p, idleCurrents, 1, 'idle');
  const sameLoad = options.idleOnly || fullCurrents.every((c, j) => c === idleCurrents[j]);
  const full = sameLoad ? idle : solveCase(p, fullCurrents, 1, 'full', { tag: 'idle', factor: 1 });
  const warnings: string[] = [];
  const cautions: string[] = [];

  let low: number[] | null = null;
  let high: number[] | null = null;
  let unloaded: number[] | null = null;
  let turnOnCurrent: number | null = null;
  const highPeak = p.source.peak * (1 + variation);
  if (!options.steadyStateOnly) {
    const lo = solveCase(p, idleCurrents, 1 - variation, 'low', { tag: 'idle', factor: 1 - variation });
    const hi = solveCase(p, idleCurrents, 1 + variation, 'high', { tag: 'idle', factor: 1 + variation });
    low = lo.record.v.map((v) => mean(v, steps));
    high = hi.record.v.map((v) => mean(v, steps));
    // switch-on: tubes not yet conducting (only bleeders load the supply), high mains, switched at the mains peak
    const zero = new Array<number>(net.k).fill(0);
    const st = solveCase(p, zero, 1 + variation, 'unloaded');
    const maxTrack = new Float64Array(net.k);
    for (let j = 0; j < net.k; j++) maxTrack[j] = peakOf(st.record.v[j]!);
    const maxCurrent = { value: 0 };
    const src: Source = { ...p.source, peak: highPeak };
    // the transient runs on a coarser step (a quarter of the steady-state steps, at least 64 per half cycle)
    const coarseSteps = Math.max(64, Math.round(steps / 4));
    p.coarse ??= discretise(net, 1 / (2 * frequency) / coarseSteps);
    const bd = loadTerm(net, p.coarse, zero);
    const start = new Float64Array(net.n + 1);
    const halfCycles = Math.max(40, Math.ceil(0.4 * 2 * frequency));
    integrate(net, p.coarse, bd, src, coarseSteps, start, { halfCycles, phase: Math.PI / 2, maxTrack, maxCurrent }, p.wsp);
    unloaded = Array.from(maxTrack);
    turnOnCurrent = maxCurrent.value;
  }

  const nodes: SupplyNodeResult[] = net.meta.map((m, j) => {
    const si = stats(idle.record.v[j]!, steps);
    const sf = stats(full.record.v[j]!, steps);
    const g = net.conductance[j]!;
    return {
      index: j,
      key: m.key,
      name: m.name,
      capacitance: net.capacitance[j]!,
      voltageRating: m.voltageRating,
      loadCurrent: idleCurrents[j]! + g * si.dc,
      fullDriveLoadCurrent: fullCurrents[j]! + g * sf.dc,
      dc: si.dc,
      ripplePeakToPeak: si.ripplePeakToPeak,
      rippleRms: si.rippleRms,
      ripple2fRms: si.ripple2fRms,
      fullDrive: sf,
      sag: si.dc - sf.dc,
      dcLowMains: low ? low[j]! : null,
      dcHighMains: high ? high[j]! : null,
      unloadedPeak: unloaded ? unloaded[j]! : null,
    };
  });
  for (const n of nodes) if (n.dc <= 0 || n.fullDrive.dc <= 0) throw new CalcError('cutoff', `Node ${n.name} collapses to ${n.fullDrive.dc.toFixed(1)} V: the supply cannot deliver this current.`);

  // through currents (full drive) for chokes and resistors
  const throughFull: number[] = new Array(net.k).fill(0);
  for (let j = net.k - 1; j >= 0; j--) throughFull[j] = nodes[j]!.fullDriveLoadCurrent + (j + 1 < net.k ? throughFull[j + 1]! : 0);
  const throughIdle: number[] = new Array(net.k).fill(0);
  for (let j = net.k - 1; j >= 0; j--) throughIdle[j] = nodes[j]!.loadCurrent + (j + 1 < net.k ? throughIdle[j + 1]! : 0);

  const ratings: SupplyRatingCheck[] = [];
  const chokes: SupplyChokeResult[] = [];
  const rippleF = 2 * frequency;
  for (const br of net.branchInto) {
    if (!br) continue;
    const sections = br.sections.map((i) => p.circuit.sections[i]!);
    for (const [idx, s] of sections.entries()) {
      const secIdx = br.sections[idx]!;
      if (s.kind === 'choke') {
        const res = 1 / (2 * Math.PI * Math.sqrt(br.inductance * net.capacitance[br.into]!));
        const first = !net.capacitorInput && br.into === 0;
        // common practice: critical inductance ≈ R_load / (3ω) for a full-wave choke input
        const rLoad = throughIdle[0]! > 0 ? nodes[0]!.dc / throughIdle[0]! : Infinity;
        const crit = first ? rLoad / (3 * 2 * Math.PI * frequency) : null;
        chokes.push({ section: secIdx, inductance: s.inductance, resistance: s.resistance, current: throughFull[br.into]!, resonance: res, criticalInductance: crit !== null && Number.isFinite(crit) ? crit : null });
        if (res > rippleF / 3) cautions.push(`The choke of section ${secIdx + 1} resonates with its capacitor at ${res.toFixed(1)} Hz, close to the ${rippleF} Hz ripple: it filters poorly and may ring (common practice: keep the resonance well below the ripple frequency).`);
        if (crit !== null && Number.isFinite(crit) && s.inductance < crit) cautions.push(`The input choke (${s.inductance} H) is below the critical inductance at idle (about ${crit.toFixed(1)} H): its current is not continuous and the voltage rises toward the peak at light load.`);
        if (throughIdle[0] === 0 && first) cautions.push('A choke-input filter with no idle load rises toward the peak voltage: fit a bleeder.');
        ratings.push(check(`choke-current-${secIdx}`, `Choke current (section ${secIdx + 1})`, throughFull[br.into]!, s.currentRating ?? null, 'A', derating));
      } else if (s.kind === 'resistor') {
        const pw = s.resistance * throughFull[br.into]! ** 2;
        ratings.push(check(`resistor-power-${secIdx}`, `Resistor dissipation (section ${secIdx + 1})`, pw, s.powerRating ?? null, 'W', derating));
      }
    }
  }

  // rectifier figures (full drive)
  const N = steps;
  const ir = full.record.ir;
  const peakCurrent = peakOf(ir);
  const averageCurrent = mean(ir, N);
  const idlePeak = peakOf(idle.record.ir);
  const bridge = p.rectifier.kind === 'silicon-bridge';
  const secondaryRms = bridge ? rms(ir, N) : Math.sqrt(rms(ir, N) ** 2 / 2);
  const piv = bridge ? highPeak : 2 * highPeak;
  const summary: RectifierSummary = {
    ...p.rectifier,
    peakCurrent: Math.max(peakCurrent, idlePeak),
    averageCurrent,
    idlePeakCurrent: idlePeak,
    fullDrivePeakCurrent: peakCurrent,
    perDevicePeakCurrent: Math.max(peakCurrent, idlePeak),
    perDeviceAverageCurrent: averageCurrent / 2,
    peakInverseVoltage: piv,
    turnOnPeakCurrent: turnOnCurrent,
  };
  const L = p.limits;
  const devLabel = p.rectifier.kind === 'vacuum' ? 'per plate' : 'per diode';
  ratings.push(check('rectifier-piv', `Rectifier peak inverse voltage (${devLabel}, high mains)`, piv, L.piv, 'V', derating));
  if (L.peakPerDevice !== null) ratings.push(check('rectifier-peak-current', `Rectifier peak current (${devLabel})`, summary.perDevicePeakCurrent, L.peakPerDevice, 'A', derating));
  if (L.averagePerDevice !== null) ratings.push(check('rectifier-average-current', `Rectifier average current (${devLabel})`, summary.perDeviceAverageCurrent, L.averagePerDevice, 'A', derating));
  if (L.dcTotal !== null) ratings.push(check('rectifier-dc-current', 'Rectifier DC output current', averageCurrent, L.dcTotal, 'A', derating));
  if (L.surge !== null && turnOnCurrent !== null)
    ratings.push(check('rectifier-surge', 'Rectifier switch-on surge current', turnOnCurrent, L.surge, 'A', derating, 'Discharged capacitors switched on at the mains peak, high mains.'));
  if (L.maxReservoir !== null && net.capacitorInput)
    ratings.push(check('rectifier-reservoir', 'Reservoir capacitance for this rectifier', net.capacitance[0]!, L.maxReservoir, 'F', derating, 'A larger input capacitor raises the peak plate current.'));
  ratings.push(check('secondary-current', `Secondary rms current${bridge ? '' : ' (each half)'}`, secondaryRms, p.circuit.secondary.currentRating ?? null, 'A', derating, bridge ? undefined : 'Each half of a centre-tapped winding carries every other pulse.'));
  for (const n of nodes) {
    if (n.unloadedPeak === null) continue;
    ratings.push(
      check(
        `capacitor-voltage-${n.index}`,
        `Capacitor voltage at switch-on (${n.name})`,
        n.unloadedPeak,
        n.voltageRating,
        'V',
        0.9,
        'Before the tubes conduct the capacitors charge to about the peak of the secondary; checked at high mains.',
      ),
    );
  }

  const reservoirRippleCurrent = rms(full.record.ic0, N);
  const bleeders = net.conductance.reduce((a, b) => a + b, 0);
  const totalC = net.capacitance.reduce((a, b) => a + b, 0);
  const hv = Math.max(...nodes.map((n) => n.unloadedPeak ?? n.dc));
  if (bleeders > 0) {
    const tau = totalC / bleeders;
    const t50 = hv > 50 ? tau * Math.log(hv / 50) : 0;
    cautions.push(`Bleeders discharge the capacitors to 50 V in roughly ${t50 < 1 ? (t50 * 1000).toFixed(0) + ' ms' : t50.toFixed(0) + ' s'} after switch-off (estimate, all capacitors taken together): measure before touching anything.`);
  } else {
    cautions.push('No bleeder resistor: the capacitors can hold a lethal charge for a long time after switch-off. Fit bleeders and discharge every capacitor before service.');
  }
  const stored = nodes.reduce((a, n) => a + 0.5 * n.capacitance * Math.max(n.unloadedPeak ?? n.dc, n.dc) ** 2, 0);
  cautions.push(`The capacitors store about ${stored.toFixed(1)} J at switch-on voltage: supply voltages above 50 V are lethal. Results are estimates to be confirmed with suitable instruments; local electrical codes and licensed practice come first.`);
  if (p.rectifier.heater) cautions.push(`The ${p.rectifier.type} heater needs ${p.rectifier.heater.voltage} V at ${p.rectifier.heater.current} A from its own winding: add it to the heater budget.`);
  if (p.rectifier.kind === 'vacuum' && p.rectifier.type === '5Y3GT') cautions.push('A directly heated rectifier has its filament at B+: its heater winding must be insulated for it.');
  if (idle.iterations < 0 || full.iterations < 0) warnings.push('The steady state was reached by plain integration over many cycles (Newton on the cycle did not settle).');

  const cyc = options.waveformCycles ?? 3;
  return {
    mainsFrequency: frequency,
    rippleFrequency: rippleF,
    secondaryPeak: p.source.peak,
    sourceResistance: p.source.resistance,
    capacitorInput: net.capacitorInput,
    nodes,
    chokes,
    rectifier: summary,
    rectifierPeakCurrent: summary.peakCurrent,
    unloadedPeak: unloaded ? Math.max(...unloaded) : null,
    reservoirRippleCurrent,
    secondaryRmsCurrent: secondaryRms,
    totalCurrent: throughIdle[0]!,
    fullDriveTotalCurrent: throughFull[0]!,
    ratings,
    waveform: { idle: waveformOf(p, idle.record, cyc), fullDrive: waveformOf(p, full.record, cyc) },
    cautions,
    warnings,
    iterations: { idle: idle.iterations, fullDrive: full.iterations },
  };
}

/** One call: the circuit with its own loads. */
export function solveSupply(circuit: SupplyCircuit, options: SupplyOptions = {}): SupplyResult {
  return solvePrepared(prepareSupply(circuit, options), {}, options);
}

export { newRecord };
