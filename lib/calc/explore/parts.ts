// The parts of a stage that exploration varies or searches: paths into the engine's stage input.
import type { StageInput, Tube } from '../input';

export type PartKind = 'resistor' | 'capacitor';

export type StagePart = {
  /** dotted path into the stage input, e.g. `bias.cathodeResistor` */
  path: string;
  label: string;
  kind: PartKind;
  unit: 'Ω' | 'F';
  nominal: number;
};

const CANDIDATES: { path: string; label: string; kind: PartKind }[] = [
  { path: 'plateResistor', label: 'Plate resistor', kind: 'resistor' },
  { path: 'cathodeResistor', label: 'Cathode resistor', kind: 'resistor' },
  { path: 'bias.cathodeResistor', label: 'Cathode resistor', kind: 'resistor' },
  { path: 'bias.biasResistor', label: 'Bias resistor', kind: 'resistor' },
  { path: 'bias.cathodeBypass', label: 'Cathode bypass capacitor', kind: 'capacitor' },
  { path: 'screen.resistor', label: 'Screen resistor', kind: 'resistor' },
  { path: 'screen.bypass', label: 'Screen bypass capacitor', kind: 'capacitor' },
  { path: 'load.resistance', label: 'Load (next grid leak)', kind: 'resistor' },
  { path: 'load.couplingCapacitor', label: 'Coupling capacitor', kind: 'capacitor' },
  { path: 'gridResistor', label: 'Grid resistor', kind: 'resistor' },
  // phase splitters
  { path: 'biasResistor', label: 'Bias resistor', kind: 'resistor' },
  { path: 'plateResistors.inverting', label: 'Plate resistor (inverting side)', kind: 'resistor' },
  { path: 'plateResistors.nonInverting', label: 'Plate resistor (non-inverting side)', kind: 'resistor' },
  { path: 'tail.biasResistor', label: 'Tail bias resistor', kind: 'resistor' },
  { path: 'tail.tailResistor', label: 'Tail resistor', kind: 'resistor' },
  { path: 'secondGridBypass', label: 'Second grid bypass capacitor', kind: 'capacitor' },
];

export function getPath(obj: unknown, path: string): unknown {
  let cur: unknown = obj;
  for (const k of path.split('.')) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<string, unknown>)[k];
  }
  return cur;
}

/** A copy of `obj` with `path` set, copying only the objects along the path. */
export function setPath<T>(obj: T, path: string, value: unknown): T {
  const keys = path.split('.');
  const rec = (o: unknown, i: number): unknown => {
    const base = o && typeof o === 'object' ? (o as Record<string, unknown>) : {};
    const k = keys[i] as string;
    return { ...base, [k]: i === keys.length - 1 ? value : rec(base[k], i + 1) };
  };
  return rec(obj, 0) as T;
}

/** Resistors and capacitors present in the stage (numeric and positive), in a fixed order. */
export function stageParts(input: StageInput): StagePart[] {
  const out: StagePart[] = [];
  for (const c of CANDIDATES) {
    const v = getPath(input, c.path);
    if (typeof v === 'number' && Number.isFinite(v) && v > 0) {
      out.push({ ...c, unit: c.kind === 'resistor' ? 'Ω' : 'F', nominal: v });
    }
  }
  return out;
}

/**
 * The tube with its emission scaled by `factor`: plate current at any fixed set of electrode voltages is multiplied
 * by `factor`. Koren's triode and pentode currents are proportional to 1/kg1 (and the pentode's screen current to
 * 1/kg2); a 3/2-power triode's to its perveance. So the current at the datasheet's typical point moves by exactly
 * the drawn factor, which is how a tube spread is stated.
 */
export function scaleEmission(tube: Tube, factor: number): Tube {
  if (factor === 1) return tube;
  switch (tube.model) {
    case 'koren-triode':
      return { ...tube, kg1: tube.kg1 / factor };
    case 'koren-pentode':
      return { ...tube, kg1: tube.kg1 / factor, kg2: tube.kg2 / factor };
    case 'child-langmuir':
      return { ...tube, perveance: tube.perveance * factor };
  }
}

/** Applies a mains factor to every voltage the power transformer sets: B+, a fixed screen supply, a fixed bias. */
export function scaleMains(input: StageInput, factor: number): StageInput {
  if (factor === 1) return input;
  let out = setPath(input, 'supply', input.supply * factor);
  const screenSupply = getPath(input, 'screen.supply');
  if (typeof screenSupply === 'number') out = setPath(out, 'screen.supply', screenSupply * factor);
  const fixedBias = getPath(input, 'bias.fixedBias');
  if (typeof fixedBias === 'number') out = setPath(out, 'bias.fixedBias', fixedBias * factor);
  return out;
}
