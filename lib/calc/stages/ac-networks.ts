import { compileAc, GROUND, SOURCE, tubeElements, type AcElement, type AcOutput, type AcRef, type AcSystem } from '../ac';
import type { TubeModel } from '../models/registry';
import type { SingleTubeSpec } from './single-tube';
import type { SampleState } from './network';

/** Small-signal conductances of a tube at a bias point (analytic derivatives where the model has them). */
export function linearise(model: TubeModel, vak: number, vgk: number, vg2k: number) {
  const pd = new Float64Array(4);
  const sd = new Float64Array(3);
  const gd = new Float64Array(2);
  let ga: number;
  let gm: number;
  let gs: number;
  if (model.plateCurrentD) {
    model.plateCurrentD(vak, vgk, vg2k, pd);
    ga = pd[1] as number;
    gm = pd[2] as number;
    gs = model.kind === 'pentode' ? (pd[3] as number) : 0;
  } else {
    const h = 1e-4;
    ga = (model.plateCurrent(vak + h, vgk, vg2k) - model.plateCurrent(vak - h, vgk, vg2k)) / (2 * h);
    gm = (model.plateCurrent(vak, vgk + h, vg2k) - model.plateCurrent(vak, vgk - h, vg2k)) / (2 * h);
    gs = model.kind === 'pentode' ? (model.plateCurrent(vak, vgk, vg2k + h) - model.plateCurrent(vak, vgk, vg2k - h)) / (2 * h) : 0;
  }
  let sg = 0;
  let ss = 0;
  if (model.kind === 'pentode') {
    if (model.screenCurrentD) {
      model.screenCurrentD(vgk, vg2k, sd);
      sg = sd[1] as number;
      ss = sd[2] as number;
    } else {
      const h = 1e-4;
      sg = (model.screenCurrent(vgk + h, vg2k) - model.screenCurrent(vgk - h, vg2k)) / (2 * h);
      ss = (model.screenCurrent(vgk, vg2k + h) - model.screenCurrent(vgk, vg2k - h)) / (2 * h);
    }
  }
  let gg = 0;
  if (vgk > 0 && model.gridCurrentD) {
    model.gridCurrentD(vgk, gd);
    gg = gd[1] as number;
  }
  return { ga, gm, gs, sg, ss, gg };
}

/** Allocates node indices; `fixed` nodes (ground, the source) pass through. */
function nodes() {
  let n = 0;
  return { next: () => n++, get count() { return n; } };
}

/**
 * The linearised network of a one-tube stage (common cathode, pentode amplifier, cathode follower, single-ended
 * output), as the ngspice netlist draws it: source EMF → Rs → grid, Rg to its return (ground, or the follower's
 * bias tap), plate and cathode resistors, bypass and coupling capacitors, the screen resistor and its bypass, the
 * tube's small-signal conductances and interelectrode capacitances. The output transformer is ideal (its
 * reflected load is a resistor).
 */
export function singleTubeAc(spec: SingleTubeSpec, op: SampleState): { sys: AcSystem; out: AcOutput; grid: AcRef } {
  const { net, model, input } = spec;
  const alloc = nodes();
  const el: AcElement[] = [];
  const rs = input.sourceResistance;
  const grid = rs > 0 ? alloc.next() : SOURCE;
  if (rs > 0) el.push({ kind: 'r', a: SOURCE, b: grid, r: rs });
  // plate: Ra (the load separately through its capacitor), or the transformer's Rdc + Zp
  const rPlate = spec.coupling && net.output === 'plate' ? net.plateDc : net.plateAc;
  const plate = rPlate > 0 ? alloc.next() : GROUND;
  if (rPlate > 0) el.push({ kind: 'r', a: plate, b: GROUND, r: rPlate });
  // cathode
  let cathode: AcRef = GROUND;
  let gridReturn: AcRef = GROUND;
  if (net.cathodeDc > 0) {
    cathode = alloc.next();
    if (net.gridPerCathodeCurrent > 0 && net.gridPerCathodeCurrent < net.cathodeDc) {
      const tap = alloc.next();
      el.push({ kind: 'r', a: cathode, b: tap, r: net.cathodeDc - net.gridPerCathodeCurrent });
      el.push({ kind: 'r', a: tap, b: GROUND, r: net.gridPerCathodeCurrent });
      gridReturn = tap;
    } else {
      el.push({ kind: 'r', a: cathode, b: GROUND, r: net.cathodeDc });
    }
    if (spec.cathodeBypass) el.push({ kind: 'c', a: cathode, b: GROUND, c: spec.cathodeBypass.capacitor, band: 'low' });
  }
  if (grid >= 0) el.push({ kind: 'r', a: grid, b: gridReturn, r: input.gridResistor });
  else if (gridReturn >= 0) el.push({ kind: 'r', a: SOURCE, b: gridReturn, r: input.gridResistor });
  // screen
  let screen: AcRef | undefined;
  if (net.screen && model.kind === 'pentode') {
    if (net.screen.dc > 0) {
      screen = alloc.next();
      el.push({ kind: 'r', a: screen, b: GROUND, r: net.screen.dc });
      if (spec.screenBypass) el.push({ kind: 'c', a: screen, b: GROUND, c: spec.screenBypass.capacitor, band: 'low' });
    } else screen = GROUND;
  }
  const d = linearise(model, op.vp - op.vk, op.vg - op.vk, op.vg2 - op.vk);
  el.push(...tubeElements({ p: plate, g: grid, k: cathode, s: screen }, d, model.capacitances));
  let outNode: AcRef = net.output === 'plate' ? plate : cathode;
  if (spec.coupling) {
    const o = alloc.next();
    el.push({ kind: 'c', a: outNode, b: o, c: spec.coupling.capacitor, band: 'low' });
    el.push({ kind: 'r', a: o, b: GROUND, r: spec.coupling.resistance });
    outNode = o;
  }
  return { sys: compileAc({ n: alloc.count, elements: el }), out: { node: outNode, scale: 1 }, grid };
}
