import type { LongTailedPairInput } from '../input';
import { compileAc, GROUND, SOURCE, tubeElements, type AcElement, type AcRef } from '../ac';
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
 * Long-tailed pair. Nodes: P1, P2 (plates), K (joined cathodes), T (tap below the shared bias resistor, when
 * there is one); in the DC circuit also the grids that return through their grid resistors.
 * Fixed slots (held circuit): 0 B+, 1 tail supply, 2 grid 1 (drive), 3 grid 2 (held by its capacitor),
 * 4 / 5 the output coupling capacitors' load ends, 6 the grid reference, 7 grid 1's held DC (bias tap).
 */
const B = fixedRef(0);
const VTAIL = fixedRef(1);
const G1 = fixedRef(2);
const G2 = fixedRef(3);
const L1 = fixedRef(4);
const L2 = fixedRef(5);
const GREF = fixedRef(6);

export function analyzeLongTailedPair(input: LongTailedPairInput, options?: AnalyzeOptions): StageAnalysis {
  if (input.tube.model === 'koren-pentode') throw new CalcError('invalid-input', 'The long-tailed pair is calculated for triodes.');
  const model = tubeModel(input.tube);
  const tail = input.tail;
  const grids = input.grids;
  const rb = tail.kind === 'resistor' ? tail.biasResistor : 0;
  const vTail = tail.kind === 'resistor' ? tail.tailSupply : 0;
  if (tail.kind === 'current-source' && grids.kind === 'bias-tap') {
    throw new CalcError('invalid-input', 'A current-source tail has no bias tap: give the grids a DC potential.');
  }
  if (grids.kind === 'bias-tap' && !(rb > 1e-3)) {
    throw new CalcError('invalid-input', 'The grids return to the bias tap, so a bias resistor above the tail is needed.');
  }
  const ra1 = input.plateResistors.inverting;
  const ra2 = input.plateResistors.nonInverting;
  const rg = input.gridResistor;
  const load = input.load;
  // a bias resistor below a milliohm is none (its conductance would swamp the node equations)
  const hasTap = tail.kind === 'resistor' && rb > 1e-3;
  const P1 = 0;
  const P2 = 1;
  const K = 2;
  const T: NodeRef = hasTap ? 3 : K;
  const nHeld = hasTap ? 4 : 3;
  const vg = grids.kind === 'dc' ? grids.gridVoltage : 0;

  const tailParts = (spec: NodalSpec) => {
    if (tail.kind === 'resistor') {
      if (hasTap) spec.resistors.push({ a: K, b: T, r: rb });
      spec.resistors.push({ a: T, b: VTAIL, r: tail.tailResistor });
    } else spec.currents.push({ node: K, i: -tail.current });
  };

  // DC circuit: capacitors open
  let next = nHeld;
  const g1Dc: NodeRef = grids.kind === 'bias-tap' ? next++ : GREF;
  const g2Dc: NodeRef = next++;
  const dcSpec: NodalSpec = {
    n: next,
    slots: 8,
    resistors: [
      { a: B, b: P1, r: ra1 },
      { a: B, b: P2, r: ra2 },
    ],
    currents: [],
    tubes: [
      { model, p: P1, g: g1Dc, k: K },
      { model, p: P2, g: g2Dc, k: K },
    ],
  };
  tailParts(dcSpec);
  if (grids.kind === 'bias-tap') dcSpec.resistors.push({ a: g1Dc, b: T, r: rg }, { a: g2Dc, b: T, r: rg });
  else dcSpec.resistors.push({ a: g2Dc, b: GREF, r: rg });
  const dc = compileNodal(dcSpec);
  dc.fixed[0] = input.supply;
  dc.fixed[1] = vTail;
  dc.fixed[6] = vg;

  // held circuit: grids fixed, loads to their capacitors' held voltages
  const heldSpec: NodalSpec = {
    n: nHeld,
    slots: 8,
    resistors: [
      { a: B, b: P1, r: ra1 },
      { a: B, b: P2, r: ra2 },
    ],
    currents: [],
    tubes: [
      { model, p: P1, g: G1, k: K },
      { model, p: P2, g: G2, k: K },
    ],
  };
  tailParts(heldSpec);
  if (grids.kind === 'bias-tap') heldSpec.resistors.push({ a: G1, b: T, r: rg }, { a: G2, b: T, r: rg });
  if (load) heldSpec.resistors.push({ a: P1, b: L1, r: load.resistance }, { a: P2, b: L2, r: load.resistance });
  const held = compileNodal(heldSpec);
  held.fixed[0] = input.supply;
  held.fixed[1] = vTail;
  held.fixed[6] = vg;

  const heldVoltages: HeldVoltage[] = [];
  if (grids.kind === 'bias-tap') {
    heldVoltages.push({
      key: 'g1',
      slot: 7,
      init: (c, s) => voltageOf(c, s, g1Dc),
      implied: (c, s) => voltageOf(c, s, T) - rg * (s.ig[0] as number),
    });
  }
  heldVoltages.push({
    key: 'g2',
    slot: 3,
    init: (c, s) => voltageOf(c, s, g2Dc),
    implied: (c, s) => (grids.kind === 'bias-tap' ? voltageOf(c, s, T) : vg) - rg * (s.ig[1] as number),
  });
  if (load) {
    heldVoltages.push(
      { key: 'c1', slot: 4, init: (c, s) => voltageOf(c, s, P1), implied: (c, s) => voltageOf(c, s, P1) },
      { key: 'c2', slot: 5, init: (c, s) => voltageOf(c, s, P2), implied: (c, s) => voltageOf(c, s, P2) },
    );
  }

  // DC start: the symmetric pair, one unknown (the tail current I, each section I/2) solved by bracketing
  const ra = 0.5 * (ra1 + ra2);
  const stateAt = (i: number) => {
    let vk: number;
    let vgk: number;
    if (tail.kind === 'resistor') {
      const vt = vTail + i * tail.tailResistor;
      vk = vt + i * rb;
      vgk = (grids.kind === 'bias-tap' ? vt : vg) - vk;
    } else {
      vk = NaN;
      vgk = NaN;
    }
    return { vk, vgk, vp: input.supply - 0.5 * i * ra };
  };
  let iTail: number;
  let vkStart: number;
  if (tail.kind === 'resistor') {
    const hi = (input.supply - vTail) / (rb + tail.tailResistor + 0.5 * ra);
    iTail = brent((i) => {
      const s = stateAt(i);
      return 0.5 * i - model.plateCurrent(s.vp - s.vk, s.vgk, 0);
    }, 0, hi, 1e-12);
    vkStart = stateAt(iTail).vk;
  } else {
    iTail = tail.current;
    const vp = input.supply - 0.5 * iTail * ra;
    // the cathode where each section carries half the tail current
    vkStart = brent((vk) => model.plateCurrent(vp - vk, vg - vk, 0) - 0.5 * iTail, vg - 200, Math.min(vp, vg + 200), 1e-9);
  }
  const dcStart = new Float64Array(dc.n);
  dcStart[P1] = input.supply - 0.5 * iTail * ra1;
  dcStart[P2] = input.supply - 0.5 * iTail * ra2;
  dcStart[K] = vkStart;
  if (hasTap) dcStart[T as number] = vkStart - iTail * rb;
  const tapStart = hasTap ? vkStart - iTail * rb : vkStart;
  if (g1Dc >= 0) dcStart[g1Dc] = tapStart;
  dcStart[g2Dc] = grids.kind === 'bias-tap' ? tapStart : vg;

  // linearised network from the source EMF
  const acNetwork = (c: NodalCircuit, s: NodalState) => {
    let n = 0;
    const node = () => n++;
    const el: AcElement[] = [];
    const p1 = node();
    const p2 = node();
    const k = node();
    const t: AcRef = hasTap ? node() : k;
    const rs = input.sourceResistance;
    const g1: AcRef = rs > 0 ? node() : SOURCE;
    const g2 = node();
    el.push({ kind: 'r', a: p1, b: GROUND, r: ra1 }, { kind: 'r', a: p2, b: GROUND, r: ra2 });
    if (tail.kind === 'resistor') {
      if (hasTap) el.push({ kind: 'r', a: k, b: t, r: rb });
      el.push({ kind: 'r', a: t, b: GROUND, r: tail.tailResistor });
    }
    if (rs > 0) el.push({ kind: 'r', a: SOURCE, b: g1, r: rs });
    const ret: AcRef = grids.kind === 'bias-tap' ? t : GROUND;
    el.push({ kind: 'r', a: g1, b: ret, r: rg });
    el.push({ kind: 'r', a: g2, b: ret, r: rg }, { kind: 'c', a: g2, b: GROUND, c: input.secondGridBypass, band: 'low' });
    const outs: AcRef[] = [p1, p2];
    if (load) {
      for (let i = 0; i < 2; i++) {
        const o = node();
        el.push({ kind: 'c', a: outs[i] as AcRef, b: o, c: load.couplingCapacitor, band: 'low' }, { kind: 'r', a: o, b: GROUND, r: load.resistance });
        outs[i] = o;
      }
    }
    const ops = [0, 1].map((i) => {
      const tb = dcSpec.tubes[i]!;
      const vk = voltageOf(c, s, tb.k);
      return linearise(model, voltageOf(c, s, tb.p) - vk, voltageOf(c, s, tb.g) - vk, 0);
    });
    el.push(...tubeElements({ p: p1, g: g1, k }, ops[0]!, model.capacitances));
    el.push(...tubeElements({ p: p2, g: g2, k }, ops[1]!, model.capacitances));
    return { sys: compileAc({ n, elements: el }), outs: [{ node: outs[0] as AcRef, scale: 1 }, { node: outs[1] as AcRef, scale: 1 }] as [{ node: AcRef; scale: number }, { node: AcRef; scale: number }] };
  };

  const rL = load?.resistance;
  const warnings: string[] = [];
  if (Math.abs(ra1 - ra2) > 1e-9 * ra1) warnings.push('The plate resistors differ (trimmed for balance).');

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
    driveBase: (m) => (grids.kind === 'bias-tap' ? (m.g1 as number) : vg),
    outputs: [
      { name: 'inverting', node: P1, load: rL ?? null },
      { name: 'non-inverting', node: P2, load: rL ?? null },
    ],
    tubes: [
      { index: 0, p: P1, g: g1Dc, k: K },
      { index: 1, p: P2, g: g2Dc, k: K },
    ],
    acNetwork,
    tailCurrent: (c, s) => (s.ia[0] as number) + (s.ig[0] as number) + (s.ia[1] as number) + (s.ig[1] as number),
    headroom: ({ solve, circuit, idle }) => {
      const ia0 = [idle.ia[0] as number, idle.ia[1] as number];
      const vak0 = [voltageOf(circuit, idle, P1) - voltageOf(circuit, idle, K), voltageOf(circuit, idle, P2) - voltageOf(circuit, idle, K)];
      const grid = (i: number, a: number) => {
        const s = solve(i === 0 ? a : -a);
        return voltageOf(circuit, s, i === 0 ? G1 : G2) - voltageOf(circuit, s, K);
      };
      // section 1 conducts more on positive drive, section 2 on negative
      const cut = (i: number, a: number) => 0.01 * (ia0[i] as number) - (solve(i === 0 ? -a : a).ia[i] as number);
      const sat = (i: number, a: number) => {
        const s = solve(i === 0 ? a : -a);
        return 0.15 * (vak0[i] as number) - (voltageOf(circuit, s, i === 0 ? P1 : P2) - voltageOf(circuit, s, K));
      };
      // cut-off first: it usually comes first in a pair, and every later search stops at the nearest limit so far
      const criteria: Array<[HeadroomLimit, (a: number) => number]> = [
        ['cutoff', (a) => cut(0, a)],
        ['cutoff', (a) => cut(1, a)],
        ['grid-conduction', (a) => grid(0, a)],
        ['grid-conduction', (a) => grid(1, a)],
        ['plate-saturation', (a) => sat(0, a)],
        ['plate-saturation', (a) => sat(1, a)],
      ];
      const words: Record<string, [string, string]> = {
        'cutoff:0': ['inverting', 'On negative drive peaks section 1 cuts off: the inverting plate rises toward the supply and the tail current all flows in section 2.'],
        'cutoff:1': ['non-inverting', 'On positive drive peaks section 2 cuts off: the tail current all flows in section 1 and the non-inverting plate rises toward the supply.'],
        'grid-conduction:0': ['inverting', 'On positive drive peaks grid 1 reaches its cathode: grid current flows and loads the driver.'],
        'grid-conduction:1': ['non-inverting', 'On negative drive peaks the shared cathode falls until grid 2 reaches it: section 2 draws grid current.'],
        'plate-saturation:0': ['inverting', 'On positive drive peaks the inverting plate falls to its cathode (plate-to-cathode voltage collapses).'],
        'plate-saturation:1': ['non-inverting', 'On negative drive peaks the non-inverting plate falls to the shared cathode.'],
      };
      return {
        criteria,
        describe: (limit, at) => {
          const candidates: Array<[string, number]> = [];
          criteria.forEach(([name, g], i) => {
            if (name !== limit) return;
            let v = -Infinity;
            try {
              v = g(at * (1 + 1e-6));
            } catch {
              // past the solvable range: leave this side last
            }
            candidates.push([`${name}:${i % 2}`, v]);
          });
          candidates.sort((x, y) => y[1] - x[1]);
          const [side, explanation] = words[candidates[0]?.[0] ?? ''] ?? ['both', ''];
          return { side, explanation };
        },
      };
    },
    plot: {
      rDc: ra1 + (tail.kind === 'resistor' ? 2 * (rb + tail.tailResistor) : 0),
      rAc: rL ? parallel(ra1, rL) : ra1,
    },
    biasKind: grids.kind === 'bias-tap' ? 'cathode' : 'fixed',
    warnings,
    options,
  });
}
