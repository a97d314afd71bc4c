import type { SplitLoadInput } from '../input';
import { compileAc, GROUND, SOURCE, tubeElements, type AcElement, type AcOutput, type AcRef } from '../ac';
import { CalcError } from '../errors';
import { tubeModel } from '../models/registry';
import { brent } from '../solve';
import type { HeadroomLimit, StageAnalysis } from '../types';
import { linearise } from './ac-networks';
import { parallel } from './common-cathode';
import { compileNodal, fixedRef, voltageOf, type NodalCircuit, type NodalSpec, type NodalState, type NodeRef } from './nodal';
import type { AnalyzeOptions } from './single-tube';
import { analyzeSplitter, type HeldVoltage } from './splitter';

/*
 * Split-load (concertina) splitter. Nodes: P (plate), K (cathode), T (junction of the bias resistor and the
 * cathode load, when there is a bias resistor); in the DC circuit also the grid when it returns through Rg.
 * Fixed slots (held circuit): 0 B+, 1 ground, 2 grid (drive), 3 / 4 the coupling capacitors' load ends,
 * 5 the DC-coupled grid potential, 6 the grid's held DC (bootstrapped).
 */
const B = fixedRef(0);
const GND = fixedRef(1);
const G = fixedRef(2);
const LP = fixedRef(3);
const LK = fixedRef(4);
const GREF = fixedRef(5);

export function analyzeSplitLoad(input: SplitLoadInput, options?: AnalyzeOptions): StageAnalysis {
  if (input.tube.model === 'koren-pentode') throw new CalcError('invalid-input', 'The split-load splitter is calculated for triodes.');
  const model = tubeModel(input.tube);
  const ra = input.plateResistor;
  const rk = input.cathodeResistor;
  const rb = input.biasResistor;
  const rg = input.gridResistor;
  const load = input.load;
  const boot = input.bias.kind === 'bootstrapped';
  const vg = input.bias.kind === 'dc-coupled' ? input.bias.gridVoltage : 0;
  if (!boot && vg >= input.supply) throw new CalcError('over-supply', 'The grid voltage is at or above the supply voltage.');
  const P = 0;
  const K = 1;
  // a bias resistor below a milliohm is none (its conductance would swamp the node equations)
  const hasTap = rb > 1e-3;
  const T: NodeRef = hasTap ? 2 : K;
  const nHeld = hasTap ? 3 : 2;

  const cathodeParts = (spec: NodalSpec) => {
    if (hasTap) spec.resistors.push({ a: K, b: T, r: rb });
    spec.resistors.push({ a: T, b: GND, r: rk });
  };
  const gDc: NodeRef = boot ? nHeld : GREF;
  const dcSpec: NodalSpec = {
    n: boot ? nHeld + 1 : nHeld,
    slots: 7,
    resistors: [{ a: B, b: P, r: ra }],
    currents: [],
    tubes: [{ model, p: P, g: gDc, k: K }],
  };
  cathodeParts(dcSpec);
  if (boot) dcSpec.resistors.push({ a: gDc, b: T, r: rg });
  const dc = compileNodal(dcSpec);
  dc.fixed[0] = input.supply;
  dc.fixed[5] = vg;

  const heldSpec: NodalSpec = {
    n: nHeld,
    slots: 7,
    resistors: [{ a: B, b: P, r: ra }],
    currents: [],
    tubes: [{ model, p: P, g: G, k: K }],
  };
  cathodeParts(heldSpec);
  // bootstrapped: the grid resistor's signal current flows into the junction
  if (boot) heldSpec.resistors.push({ a: G, b: T, r: rg });
  if (load) heldSpec.resistors.push({ a: P, b: LP, r: load.resistance }, { a: K, b: LK, r: load.resistance });
  const held = compileNodal(heldSpec);
  held.fixed[0] = input.supply;
  held.fixed[5] = vg;

  const heldVoltages: HeldVoltage[] = [];
  if (boot) {
    heldVoltages.push({ key: 'g', slot: 6, init: (c, s) => voltageOf(c, s, gDc), implied: (c, s) => voltageOf(c, s, T) - rg * (s.ig[0] as number) });
  }
  if (load) {
    heldVoltages.push(
      { key: 'cp', slot: 3, init: (c, s) => voltageOf(c, s, P), implied: (c, s) => voltageOf(c, s, P) },
      { key: 'ck', slot: 4, init: (c, s) => voltageOf(c, s, K), implied: (c, s) => voltageOf(c, s, K) },
    );
  }

  // DC start: one unknown, the cathode current I
  const at = (i: number) => {
    const vk = i * (rb + rk);
    const vgk = (boot ? i * rk : vg) - vk;
    return { vak: input.supply - i * ra - vk, vgk, vk };
  };
  const hi = input.supply / (ra + rb + rk);
  const i0 = brent((i) => {
    const s = at(i);
    return i - model.plateCurrent(s.vak, s.vgk, 0);
  }, 0, hi, 1e-12);
  const dcStart = new Float64Array(dc.n);
  dcStart[P] = input.supply - i0 * ra;
  dcStart[K] = i0 * (rb + rk);
  if (hasTap) dcStart[T as number] = i0 * rk;
  if (boot) dcStart[gDc] = i0 * rk;

  const acNetwork = (c: NodalCircuit, s: NodalState) => {
    let n = 0;
    const node = () => n++;
    const el: AcElement[] = [];
    const p = node();
    const k = node();
    const t: AcRef = hasTap ? node() : k;
    const rs = input.sourceResistance;
    const g: AcRef = rs > 0 ? node() : SOURCE;
    el.push({ kind: 'r', a: p, b: GROUND, r: ra });
    if (hasTap) el.push({ kind: 'r', a: k, b: t, r: rb });
    el.push({ kind: 'r', a: t, b: GROUND, r: rk });
    if (rs > 0) el.push({ kind: 'r', a: SOURCE, b: g, r: rs });
    el.push({ kind: 'r', a: g, b: boot ? t : GROUND, r: rg });
    const outs: AcRef[] = [p, k];
    if (load) {
      for (let i = 0; i < 2; i++) {
        const o = node();
        el.push({ kind: 'c', a: outs[i] as AcRef, b: o, c: load.couplingCapacitor, band: 'low' }, { kind: 'r', a: o, b: GROUND, r: load.resistance });
        outs[i] = o;
      }
    }
    const vk = voltageOf(c, s, K);
    const d = linearise(model, voltageOf(c, s, P) - vk, voltageOf(c, s, gDc) - vk, 0);
    el.push(...tubeElements({ p, g, k }, d, model.capacitances));
    return { sys: compileAc({ n, elements: el }), outs: [{ node: outs[0] as AcRef, scale: 1 }, { node: outs[1] as AcRef, scale: 1 }] as [AcOutput, AcOutput] };
  };

  const warnings: string[] = [];
  if (Math.abs(ra - rk) > 0.02 * ra) warnings.push('The plate and cathode loads differ by more than 2 %: the outputs are not balanced.');
  if (!boot) warnings.push('DC-coupled grid: the grid-circuit resistance is checked against the fixed-bias limit.');
  const rL = load?.resistance ?? null;

  return analyzeSplitter({
    topology: input.topology,
    tube: input.tube,
    model,
    input,
    dc,
    dcStart,
    held,
    heldVoltages,
    driveSlot: 2,
    driveBase: (m) => (boot ? (m.g as number) : vg),
    outputs: [
      { name: 'plate', node: P, load: rL },
      { name: 'cathode', node: K, load: rL },
    ],
    tubes: [{ index: 0, p: P, g: gDc, k: K }],
    acNetwork,
    tailCurrent: (_c, s) => (s.ia[0] as number) + (s.ig[0] as number),
    headroom: ({ solve, circuit, idle }) => {
      const ia0 = idle.ia[0] as number;
      const vak0 = voltageOf(circuit, idle, P) - voltageOf(circuit, idle, K);
      const criteria: Array<[HeadroomLimit, (a: number) => number]> = [
        ['grid-conduction', (a) => { const s = solve(a); return voltageOf(circuit, s, G) - voltageOf(circuit, s, K); }],
        ['plate-saturation', (a) => { const s = solve(a); return 0.15 * vak0 - (voltageOf(circuit, s, P) - voltageOf(circuit, s, K)); }],
        ['cutoff', (a) => 0.01 * ia0 - (solve(-a).ia[0] as number)],
      ];
      const words: Record<HeadroomLimit, [string, string]> = {
        'plate-saturation': [
          'plate',
          'On positive drive peaks the plate falls while the cathode rises until the plate-to-cathode voltage collapses: the plate output flattens first, the cathode output with it.',
        ],
        'grid-conduction': [
          'cathode',
          'On positive drive peaks the grid catches up with the cathode and draws current: the cathode output stops following and the driver is loaded.',
        ],
        cutoff: [
          'both',
          'On negative drive peaks the tube cuts off: the plate rises toward the supply and the cathode falls, and both outputs flatten together.',
        ],
        none: ['none', ''],
      };
      return { criteria, describe: (limit) => ({ side: words[limit][0], explanation: words[limit][1] }) };
    },
    plot: {
      rDc: ra + rb + rk,
      rAc: (rL ? parallel(ra, rL) : ra) + rb + (rL ? parallel(rk, rL) : rk),
    },
    biasKind: boot ? 'cathode' : 'fixed',
    warnings,
    options,
  });
}
