import type { Tube } from '../input';
import { tubeModel, type TubeModel } from '../models/registry';

/**
 * A whole amplifier as one flat circuit: named nodes, linear elements, tubes. The chain solver (mna.ts) and the
 * SPICE writer (spice.ts) both read this one description, so the engine and ngspice see the same circuit.
 *
 * Node names are free strings; '0' is ground. `alias(a, b)` joins two names into one node (a direct link, a
 * zero-ohm plate resistor). Fixed nodes carry a known voltage: a DC value plus, for the signal source, a sine
 * of unit amplitude scaled by the chain's input level.
 */
export type Resistor = { name: string; a: string; b: string; r: number };
export type Capacitor = { name: string; a: string; b: string; c: number };
/** A constant current from a to b through the source (a tail current sink). */
export type CurrentSource = { name: string; a: string; b: string; i: number };
export type Inductor = { name: string; a: string; b: string; l: number };
/** Ideal centre-tapped output transformer: v(n1)−v(p1) = k·(i1−i2) = v(p2)−v(n2), k = Raa/4. */
export type Winding = { name: string; n1: string; p1: string; n2: string; p2: string; k: number };
/**
 * Ideal two-winding transformer (no magnetising current, no leakage): v(p1)−v(p2) = ratio·(v(s1)−v(s2)) and
 * ampere-turns balance, so the current into s1 is −ratio times the current into p1. Real transformers are built
 * around it from R, L and C (lib/calc/feedback/output-transformer.ts).
 */
export type IdealTransformer = { name: string; p1: string; p2: string; s1: string; s2: string; ratio: number };
export type TubeElement = {
  name: string;
  tube: Tube;
  model: TubeModel;
  plate: string;
  grid: string;
  cathode: string;
  screen: string | null;
  /** the stage the tube belongs to (for per-stage limits) */
  stage: string;
};
export type FixedNode = { node: string; dc: number; signal: number };
/** A probe is a weighted sum of node voltages (a node, a difference, a transformer primary). */
export type Probe = Array<[string, number]>;

export class Circuit {
  resistors: Resistor[] = [];
  capacitors: Capacitor[] = [];
  inductors: Inductor[] = [];
  currents: CurrentSource[] = [];
  windings: Winding[] = [];
  transformers: IdealTransformer[] = [];
  tubes: TubeElement[] = [];
  fixed: FixedNode[] = [];
  private parent = new Map<string, string>();

  find(name: string): string {
    let n = name;
    for (;;) {
      const p = this.parent.get(n);
      if (p === undefined || p === n) return n;
      n = p;
    }
  }

  /** Joins two node names into one node ('0' and fixed nodes win as the representative). */
  alias(a: string, b: string): void {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra === rb) return;
    const fixedA = ra === '0' || this.fixed.some((f) => f.node === ra);
    if (fixedA) this.parent.set(rb, ra);
    else this.parent.set(ra, rb);
  }

  resistor(name: string, a: string, b: string, r: number): void {
    this.resistors.push({ name, a, b, r });
  }
  capacitor(name: string, a: string, b: string, c: number): void {
    if (c > 0) this.capacitors.push({ name, a, b, c });
  }
  inductor(name: string, a: string, b: string, l: number): void {
    this.inductors.push({ name, a, b, l });
  }
  current(name: string, a: string, b: string, i: number): void {
    this.currents.push({ name, a, b, i });
  }
  winding(name: string, n1: string, p1: string, n2: string, p2: string, k: number): void {
    this.windings.push({ name, n1, p1, n2, p2, k });
  }
  idealTransformer(name: string, p1: string, p2: string, s1: string, s2: string, ratio: number): void {
    this.transformers.push({ name, p1, p2, s1, s2, ratio });
  }
  fix(node: string, dc: number, signal = 0): void {
    this.fixed.push({ node, dc, signal });
  }
  addTube(name: string, stage: string, tube: Tube, plate: string, grid: string, cathode: string, screen: string | null): void {
    this.tubes.push({ name, stage, tube, model: tubeModel(tube), plate, grid, cathode, screen });
    // interelectrode capacitances, as in the SPICE subcircuit (Miller loading comes from these)
    const caps = tube.capacitances;
    if (caps) {
      this.capacitor(`CGK_${name}`, grid, cathode, caps.cgk);
      this.capacitor(`CGA_${name}`, grid, plate, caps.cga);
      this.capacitor(`CAK_${name}`, plate, cathode, caps.cak);
    }
  }
}
