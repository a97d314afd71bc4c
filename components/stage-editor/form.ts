// Pure helpers between the stage editor's form (text as the user typed it) and the stage body the API takes
// (SI numbers, validated by stageBodySchema). No React here, so it is unit-tested on its own.
import type { z } from 'zod';
import { stageBodySchema, type StageBody, type Topology } from '@/lib/validation/stage';
import { formatEng } from '@/lib/format/number';

export const TOPOLOGIES: { value: Topology; label: string }[] = [
  { value: 'common-cathode', label: 'Common cathode (voltage amplifier)' },
  { value: 'cathode-follower', label: 'Cathode follower' },
  { value: 'pentode-amplifier', label: 'Pentode voltage amplifier' },
  { value: 'single-ended-output', label: 'Single-ended output' },
  { value: 'push-pull-output', label: 'Push-pull output' },
  { value: 'long-tailed-pair', label: 'Long-tailed pair (phase splitter)' },
  { value: 'split-load', label: 'Split-load phase splitter (concertina)' },
];

export function topologyLabel(t: string): string {
  return TOPOLOGIES.find((x) => x.value === t)?.label ?? t;
}

/** Every value is kept as the text the user typed; the schema turns it into SI numbers. */
export type StageFormValues = {
  name: string;
  supplyNode: string;
  tubeId: string;
  tubeModelId: string;
  topology: Topology;
  supply: string;
  gridResistor: string;
  sourceResistance: string;
  heaterElevation: string;
  derating: string;
  drive: { amplitude: string; frequency: string };
  plateResistor: string;
  cathodeResistor: string;
  primaryImpedance: string;
  primaryResistance: string;
  plateToPlateImpedance: string;
  class: 'A' | 'AB';
  /** long-tailed pair: the non-inverting section's plate resistor (plateResistor is the inverting one) */
  secondPlateResistor: string;
  /** long-tailed pair: the tail below the shared bias resistor (bias.biasResistor) */
  tail: { kind: 'resistor' | 'current-source'; tailResistor: string; tailSupply: string; current: string };
  secondGridBypass: string;
  bias: {
    kind: 'cathode' | 'fixed' | 'dc-coupled' | 'self' | 'bias-tap' | 'bootstrapped';
    cathodeResistor: string;
    cathodeBypass: string;
    fixedBias: string;
    gridVoltage: string;
    biasResistor: string;
  };
  screen: { kind: 'fixed' | 'resistor'; supply: string; resistor: string; bypass: string };
  load: { enabled: boolean; resistance: string; couplingCapacitor: string };
  /** output stages: the transformer beyond the ideal one (empty values are limits that are not modelled) */
  transformer: { enabled: boolean; speakerLoad: string; secondaryResistance: string; primaryInductance: string; leakageInductance: string; windingCapacitance: string };
  /** output stages: global feedback from the speaker terminal to the project's first stage */
  feedback: { enabled: boolean; resistor: string; shuntResistor: string; capacitor: string; polarity: 'auto' | 'normal' | 'reversed' };
};

/** Units shown beside each field (the schema records the same unit in each quantity's meta; a unit test checks). */
export const FIELD_UNITS: Record<string, string> = {
  supply: 'V',
  gridResistor: 'Ω',
  sourceResistance: 'Ω',
  heaterElevation: 'V',
  derating: '',
  'drive.amplitude': 'V',
  'drive.frequency': 'Hz',
  plateResistor: 'Ω',
  cathodeResistor: 'Ω',
  primaryImpedance: 'Ω',
  primaryResistance: 'Ω',
  plateToPlateImpedance: 'Ω',
  'bias.cathodeResistor': 'Ω',
  'bias.cathodeBypass': 'F',
  'bias.fixedBias': 'V',
  'bias.gridVoltage': 'V',
  'bias.biasResistor': 'Ω',
  'screen.supply': 'V',
  'screen.resistor': 'Ω',
  'screen.bypass': 'F',
  'load.resistance': 'Ω',
  'load.couplingCapacitor': 'F',
  secondPlateResistor: 'Ω',
  'tail.tailResistor': 'Ω',
  'tail.tailSupply': 'V',
  'tail.current': 'A',
  secondGridBypass: 'F',
  'transformer.speakerLoad': 'Ω',
  'transformer.secondaryResistance': 'Ω',
  'transformer.primaryInductance': 'H',
  'transformer.leakageInductance': 'H',
  'transformer.windingCapacitance': 'F',
  'feedback.resistor': 'Ω',
  'feedback.shuntResistor': 'Ω',
  'feedback.capacitor': 'F',
};

/** SI number → the text a practitioner would type: 4700 → '4.7k', 2.2e-8 → '22n', -1.5 → '-1.5'. */
export function toFieldText(value: unknown): string {
  if (typeof value !== 'number' || !Number.isFinite(value)) return typeof value === 'string' ? value : '';
  if (value === 0) return '0';
  const abs = Math.abs(value);
  // plain numbers read better than milli-prefixes for ratios and volts around 1
  if (abs >= 0.1 && abs < 1000) return String(Number(value.toPrecision(6)));
  return formatEng(value, '', 6).replace(/\s+/g, '').replace('µ', 'u');
}

// Starting values for a new stage (common practice for small-signal and output stages; the designer types over them).
const BASE: StageFormValues = {
  name: '',
  supplyNode: '',
  tubeId: '',
  tubeModelId: '',
  topology: 'common-cathode',
  supply: '300',
  gridResistor: '1M',
  sourceResistance: '0',
  heaterElevation: '0',
  derating: '0.7',
  drive: { amplitude: '0.5', frequency: '1k' },
  plateResistor: '100k',
  cathodeResistor: '22k',
  primaryImpedance: '5k',
  primaryResistance: '0',
  plateToPlateImpedance: '6k6',
  class: 'AB',
  bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u', fixedBias: '-2', gridVoltage: '100', biasResistor: '1k' },
  screen: { kind: 'resistor', supply: '250', resistor: '470k', bypass: '100n' },
  load: { enabled: true, resistance: '470k', couplingCapacitor: '22n' },
  secondPlateResistor: '100k',
  tail: { kind: 'resistor', tailResistor: '22k', tailSupply: '0', current: '2m' },
  secondGridBypass: '100n',
  transformer: { enabled: false, speakerLoad: '8', secondaryResistance: '', primaryInductance: '', leakageInductance: '', windingCapacitance: '' },
  feedback: { enabled: false, resistor: '4k7', shuntResistor: '100', capacitor: '', polarity: 'auto' },
};

const TOPOLOGY_DEFAULTS: Record<Topology, (v: StageFormValues) => StageFormValues> = {
  'common-cathode': (v) => ({ ...v, plateResistor: '100k', bias: { ...v.bias, kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' }, load: { ...v.load, enabled: true }, drive: { ...v.drive, amplitude: '0.5' } }),
  'cathode-follower': (v) => ({ ...v, plateResistor: '0', cathodeResistor: '22k', bias: { ...v.bias, kind: 'self', biasResistor: '1k' }, load: { ...v.load, enabled: true }, drive: { ...v.drive, amplitude: '1' } }),
  // sized for the library's pentodes (power types used as voltage amplifiers): plate near 110 V at about 8 mA
  'pentode-amplifier': (v) => ({ ...v, supply: '300', gridResistor: '470k', plateResistor: '22k', bias: { ...v.bias, kind: 'cathode', cathodeResistor: '1k', cathodeBypass: '22u' }, screen: { ...v.screen, kind: 'resistor', resistor: '1M', bypass: '100n' }, load: { ...v.load, enabled: true }, drive: { ...v.drive, amplitude: '0.5' } }),
  // output stages start with a grid resistor within the usual output-tube limits (cathode bias ≤ 470 kΩ, fixed ≤ 100 kΩ)
  'single-ended-output': (v) => ({ ...v, supply: '300', gridResistor: '220k', primaryImpedance: '5k', primaryResistance: '150', bias: { ...v.bias, kind: 'cathode', cathodeResistor: '300', cathodeBypass: '100u' }, screen: { ...v.screen, kind: 'fixed', supply: '280' }, load: { ...v.load, enabled: false }, drive: { ...v.drive, amplitude: '5' } }),
  // a 12AX7/12AT7 splitter into a push-pull pair's grid leaks (common practice values)
  'long-tailed-pair': (v) => ({ ...v, supply: '350', plateResistor: '100k', secondPlateResistor: '100k', bias: { ...v.bias, kind: 'bias-tap', biasResistor: '1k', gridVoltage: '0' }, tail: { ...v.tail, kind: 'resistor', tailResistor: '22k', tailSupply: '0' }, secondGridBypass: '100n', load: { enabled: true, resistance: '220k', couplingCapacitor: '100n' }, drive: { ...v.drive, amplitude: '2' } }),
  'split-load': (v) => ({ ...v, supply: '350', plateResistor: '22k', cathodeResistor: '22k', bias: { ...v.bias, kind: 'bootstrapped', biasResistor: '1k5', gridVoltage: '100' }, load: { enabled: true, resistance: '220k', couplingCapacitor: '100n' }, drive: { ...v.drive, amplitude: '5' } }),
  'push-pull-output': (v) => ({ ...v, supply: '400', gridResistor: '100k', plateToPlateImpedance: '6k6', primaryResistance: '200', class: 'AB', bias: { ...v.bias, kind: 'fixed', fixedBias: '-38' }, screen: { ...v.screen, kind: 'fixed', supply: '380' }, load: { ...v.load, enabled: false }, drive: { ...v.drive, amplitude: '10' } }),
};

export function newStageDefaults(topology: Topology = 'common-cathode', patch: Partial<StageFormValues> = {}): StageFormValues {
  return { ...TOPOLOGY_DEFAULTS[topology]({ ...BASE, topology }), ...patch };
}

/** On a new stage, switching topology swaps in that topology's starting values, keeping name, tube and supply. */
export function switchTopology(values: StageFormValues, topology: Topology): StageFormValues {
  return TOPOLOGY_DEFAULTS[topology]({ ...values, topology });
}

export const BIAS_KINDS: Record<Topology, { value: StageFormValues['bias']['kind']; label: string }[]> = {
  'common-cathode': [
    { value: 'cathode', label: 'Cathode bias (resistor)' },
    { value: 'fixed', label: 'Fixed bias (negative supply)' },
  ],
  'cathode-follower': [
    { value: 'self', label: 'Self-biased (tapped cathode resistor)' },
    { value: 'dc-coupled', label: 'DC-coupled grid' },
  ],
  'pentode-amplifier': [
    { value: 'cathode', label: 'Cathode bias (resistor)' },
    { value: 'fixed', label: 'Fixed bias (negative supply)' },
  ],
  'single-ended-output': [
    { value: 'cathode', label: 'Cathode bias (resistor)' },
    { value: 'fixed', label: 'Fixed bias (negative supply)' },
  ],
  'push-pull-output': [
    { value: 'cathode', label: 'Cathode bias (shared resistor)' },
    { value: 'fixed', label: 'Fixed bias (negative supply)' },
  ],
  'long-tailed-pair': [
    { value: 'bias-tap', label: 'Grids return to the bias tap' },
    { value: 'dc-coupled', label: 'Grids at a DC potential (DC-coupled)' },
  ],
  'split-load': [
    { value: 'bootstrapped', label: 'Grid leak to the cathode-load junction' },
    { value: 'dc-coupled', label: 'DC-coupled grid' },
  ],
};

/** Which optional sections a topology has. */
export function sectionsFor(topology: Topology, tubeIsPentode: boolean) {
  return {
    plateResistor:
      topology === 'common-cathode' || topology === 'pentode-amplifier' || topology === 'cathode-follower' || topology === 'long-tailed-pair' || topology === 'split-load',
    cathodeResistor: topology === 'cathode-follower' || topology === 'split-load',
    secondPlateResistor: topology === 'long-tailed-pair',
    tail: topology === 'long-tailed-pair',
    primaryImpedance: topology === 'single-ended-output',
    plateToPlateImpedance: topology === 'push-pull-output',
    primaryResistance: topology === 'single-ended-output' || topology === 'push-pull-output',
    pushPullClass: topology === 'push-pull-output',
    // a pentode or beam tetrode in an output stage needs its screen supply
    screen: topology === 'pentode-amplifier' || ((topology === 'single-ended-output' || topology === 'push-pull-output') && tubeIsPentode),
    load: topology === 'common-cathode' || topology === 'pentode-amplifier' || topology === 'cathode-follower' || topology === 'long-tailed-pair' || topology === 'split-load',
    transformer: topology === 'single-ended-output' || topology === 'push-pull-output',
    feedback: topology === 'single-ended-output' || topology === 'push-pull-output',
  };
}

const blankToNull = (s: string) => (s.trim() === '' ? null : s.trim());
const text = (s: string) => s.trim();

/**
 * Builds the stage body (what stageBodySchema parses) from the form: only the fields of the chosen topology.
 * Empty optional text becomes "absent"; an empty bypass capacitor means "no bypass" (null).
 */
export function toStageBodyInput(v: StageFormValues, opts: { tubeIsPentode?: boolean } = {}): Record<string, unknown> {
  const s = sectionsFor(v.topology, opts.tubeIsPentode ?? false);
  const tubeId = /^\d+$/.test(v.tubeId) ? Number(v.tubeId) : v.tubeId === '' ? undefined : v.tubeId;
  const body: Record<string, unknown> = {
    topology: v.topology,
    tubeId,
    supply: text(v.supply),
    gridResistor: text(v.gridResistor),
    sourceResistance: text(v.sourceResistance) || '0',
    heaterElevation: text(v.heaterElevation) || '0',
    derating: text(v.derating) || '0.7',
    drive: { amplitude: text(v.drive.amplitude) || '0', frequency: text(v.drive.frequency) || '1k' },
  };
  if (s.plateResistor) body.plateResistor = v.topology === 'cathode-follower' ? text(v.plateResistor) || '0' : text(v.plateResistor);
  if (s.cathodeResistor) body.cathodeResistor = text(v.cathodeResistor);
  if (s.primaryImpedance) body.primaryImpedance = text(v.primaryImpedance);
  if (s.plateToPlateImpedance) body.plateToPlateImpedance = text(v.plateToPlateImpedance);
  if (s.primaryResistance) body.primaryResistance = text(v.primaryResistance) || '0';
  if (s.pushPullClass) body.class = v.class;
  if (v.topology === 'long-tailed-pair') {
    delete body.plateResistor;
    body.plateResistors = { inverting: text(v.plateResistor), nonInverting: text(v.secondPlateResistor) };
    body.tail =
      v.tail.kind === 'current-source'
        ? { kind: 'current-source', current: text(v.tail.current) }
        : { kind: 'resistor', biasResistor: text(v.bias.biasResistor) || '0', tailResistor: text(v.tail.tailResistor), tailSupply: text(v.tail.tailSupply) || '0' };
    body.grids = v.bias.kind === 'dc-coupled' ? { kind: 'dc', gridVoltage: text(v.bias.gridVoltage) } : { kind: 'bias-tap' };
    body.secondGridBypass = text(v.secondGridBypass);
  } else if (v.topology === 'split-load') {
    body.biasResistor = text(v.bias.biasResistor) || '0';
    body.bias = v.bias.kind === 'dc-coupled' ? { kind: 'dc-coupled', gridVoltage: text(v.bias.gridVoltage) } : { kind: 'bootstrapped' };
  } else if (v.topology === 'cathode-follower') {
    body.bias = v.bias.kind === 'dc-coupled' ? { kind: 'dc-coupled', gridVoltage: text(v.bias.gridVoltage) } : { kind: 'self', biasResistor: text(v.bias.biasResistor) };
  } else {
    body.bias = v.bias.kind === 'fixed' ? { kind: 'fixed', fixedBias: text(v.bias.fixedBias) } : { kind: 'cathode', cathodeResistor: text(v.bias.cathodeResistor), cathodeBypass: blankToNull(v.bias.cathodeBypass) };
  }
  if (s.screen) {
    body.screen =
      v.screen.kind === 'resistor'
        ? { kind: 'resistor', resistor: text(v.screen.resistor), bypass: blankToNull(v.screen.bypass) }
        : text(v.screen.supply) === ''
          ? { kind: 'fixed' }
          : { kind: 'fixed', supply: text(v.screen.supply) };
  }
  if (s.load && v.load.enabled) body.load = { resistance: text(v.load.resistance), couplingCapacitor: text(v.load.couplingCapacitor) };
  if (s.transformer && v.transformer.enabled) {
    const x = v.transformer;
    body.transformer = {
      speakerLoad: text(x.speakerLoad),
      secondaryResistance: blankToNull(x.secondaryResistance),
      primaryInductance: blankToNull(x.primaryInductance),
      leakageInductance: blankToNull(x.leakageInductance),
      windingCapacitance: blankToNull(x.windingCapacitance),
    };
  }
  if (s.feedback && v.feedback.enabled) {
    body.feedback = { resistor: text(v.feedback.resistor), shuntResistor: text(v.feedback.shuntResistor), capacitor: blankToNull(v.feedback.capacitor), polarity: v.feedback.polarity };
  }
  return body;
}

export type FieldErrorMap = Record<string, string>;

/** Zod issues → one message per dotted path (the first one wins). */
export function issuesToFieldErrors(issues: readonly z.core.$ZodIssue[]): FieldErrorMap {
  const out: FieldErrorMap = {};
  for (const issue of issues) {
    const key = issue.path.map(String).join('.') || '_form';
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}

/** The phase splitters' body fields that the form shows under another name. */
const SPLITTER_FIELD_ALIASES: Record<string, string> = {
  'plateResistors.inverting': 'plateResistor',
  'plateResistors.nonInverting': 'secondPlateResistor',
  'tail.biasResistor': 'bias.biasResistor',
  'grids.gridVoltage': 'bias.gridVoltage',
  'grids.kind': 'bias.kind',
  biasResistor: 'bias.biasResistor',
};

export function toFormFieldErrors(errors: FieldErrorMap, topology: Topology): FieldErrorMap {
  if (topology !== 'long-tailed-pair' && topology !== 'split-load') return errors;
  const out: FieldErrorMap = {};
  for (const [k, m] of Object.entries(errors)) {
    const key = SPLITTER_FIELD_ALIASES[k] ?? k;
    if (!(key in out)) out[key] = m;
  }
  return out;
}

export type ParsedStage = { ok: true; body: StageBody } | { ok: false; errors: FieldErrorMap };

export function parseStageForm(v: StageFormValues, opts: { tubeIsPentode?: boolean } = {}): ParsedStage {
  const input = toStageBodyInput(v, opts);
  if (input.tubeId === undefined) return { ok: false, errors: { tubeId: 'Choose a tube from the library.' } };
  const r = stageBodySchema.safeParse(input);
  return r.success ? { ok: true, body: r.data } : { ok: false, errors: toFormFieldErrors(issuesToFieldErrors(r.error.issues), v.topology) };
}

/** Stored stage inputs (SI numbers) → form text. Missing parts fall back to the topology's starting values. */
export function fromStageInputs(
  inputs: Record<string, unknown>,
  meta: { name: string; supplyNode: string | null; tubeTypeId: number; tubeModelId: number | null; topology: string },
): StageFormValues {
  const topology = (TOPOLOGIES.some((t) => t.value === meta.topology) ? meta.topology : 'common-cathode') as Topology;
  const base = newStageDefaults(topology);
  const i = inputs as Record<string, any>;
  const t = (x: unknown, fallback: string) => (x === undefined ? fallback : x === null ? '' : toFieldText(x));
  const bias = (i.bias ?? {}) as Record<string, unknown>;
  const screen = i.screen as Record<string, unknown> | undefined;
  const load = i.load as Record<string, unknown> | undefined;
  const plates = i.plateResistors as Record<string, unknown> | undefined;
  const tail = i.tail as Record<string, unknown> | undefined;
  const grids = i.grids as Record<string, unknown> | undefined;
  const xf = i.transformer as Record<string, unknown> | undefined;
  const fbk = i.feedback as Record<string, unknown> | undefined;
  const splitterBiasKind =
    topology === 'long-tailed-pair' ? (grids?.kind === 'dc' ? 'dc-coupled' : 'bias-tap') : topology === 'split-load' ? (bias.kind === 'dc-coupled' ? 'dc-coupled' : 'bootstrapped') : null;
  return {
    ...base,
    name: meta.name,
    supplyNode: meta.supplyNode ?? '',
    tubeId: String(meta.tubeTypeId ?? i.tubeId ?? ''),
    tubeModelId: meta.tubeModelId ? String(meta.tubeModelId) : '',
    topology,
    supply: t(i.supply, base.supply),
    gridResistor: t(i.gridResistor, base.gridResistor),
    sourceResistance: t(i.sourceResistance, base.sourceResistance),
    heaterElevation: t(i.heaterElevation, base.heaterElevation),
    derating: t(i.derating, base.derating),
    drive: { amplitude: t(i.drive?.amplitude, base.drive.amplitude), frequency: t(i.drive?.frequency, base.drive.frequency) },
    plateResistor: t(plates ? plates.inverting : i.plateResistor, base.plateResistor),
    secondPlateResistor: t(plates?.nonInverting, base.secondPlateResistor),
    tail: {
      kind: tail?.kind === 'current-source' ? 'current-source' : 'resistor',
      tailResistor: t(tail?.tailResistor, base.tail.tailResistor),
      tailSupply: t(tail?.tailSupply, base.tail.tailSupply),
      current: t(tail?.current, base.tail.current),
    },
    secondGridBypass: t(i.secondGridBypass, base.secondGridBypass),
    cathodeResistor: t(i.cathodeResistor, base.cathodeResistor),
    primaryImpedance: t(i.primaryImpedance, base.primaryImpedance),
    primaryResistance: t(i.primaryResistance, base.primaryResistance),
    plateToPlateImpedance: t(i.plateToPlateImpedance, base.plateToPlateImpedance),
    class: i.class === 'A' ? 'A' : i.class === 'AB' ? 'AB' : base.class,
    bias: {
      ...base.bias,
      kind: (splitterBiasKind ?? (typeof bias.kind === 'string' ? bias.kind : base.bias.kind)) as StageFormValues['bias']['kind'],
      cathodeResistor: t(bias.cathodeResistor, base.bias.cathodeResistor),
      cathodeBypass: bias.kind === 'cathode' ? t(bias.cathodeBypass ?? null, '') : base.bias.cathodeBypass,
      fixedBias: t(bias.fixedBias, base.bias.fixedBias),
      gridVoltage: t(grids?.gridVoltage ?? bias.gridVoltage, base.bias.gridVoltage),
      biasResistor: t(tail?.biasResistor ?? i.biasResistor ?? bias.biasResistor, base.bias.biasResistor),
    },
    screen: screen
      ? {
          kind: screen.kind === 'resistor' ? 'resistor' : 'fixed',
          supply: t(screen.supply, screen.kind === 'fixed' ? '' : base.screen.supply),
          resistor: t(screen.resistor, base.screen.resistor),
          bypass: screen.kind === 'resistor' ? t(screen.bypass ?? null, '') : base.screen.bypass,
        }
      : base.screen,
    load: load ? { enabled: true, resistance: t(load.resistance, base.load.resistance), couplingCapacitor: t(load.couplingCapacitor, base.load.couplingCapacitor) } : { ...base.load, enabled: false },
    transformer: xf
      ? {
          enabled: true,
          speakerLoad: t(xf.speakerLoad, base.transformer.speakerLoad),
          secondaryResistance: t(xf.secondaryResistance ?? null, ''),
          primaryInductance: t(xf.primaryInductance ?? null, ''),
          leakageInductance: t(xf.leakageInductance ?? null, ''),
          windingCapacitance: t(xf.windingCapacitance ?? null, ''),
        }
      : base.transformer,
    feedback: fbk
      ? {
          enabled: true,
          resistor: t(fbk.resistor, base.feedback.resistor),
          shuntResistor: t(fbk.shuntResistor, base.feedback.shuntResistor),
          capacitor: t(fbk.capacitor ?? null, ''),
          polarity: fbk.polarity === 'normal' || fbk.polarity === 'reversed' ? fbk.polarity : 'auto',
        }
      : base.feedback,
  };
}
