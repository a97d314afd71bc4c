import { z } from 'zod';
import { quantity } from '../validation/quantity';
import { text } from '../validation/text';

const ohms = (o: { positive?: boolean } = { positive: true }) =>
  o.positive ? quantity('Ω', { positive: true }) : quantity('Ω', { min: 0 });
const farads = () => quantity('F', { positive: true });
const volts = () => quantity('V');
const positiveVolts = () => quantity('V', { positive: true });

export const capacitancesSchema = z.object({
  cgk: quantity('F', { min: 0 }),
  cga: quantity('F', { min: 0 }),
  cak: quantity('F', { min: 0 }),
});

export const tubeRatingsSchema = z.object({
  plateVoltage: positiveVolts().optional(),
  plateDissipation: quantity('W', { positive: true }).optional(),
  screenVoltage: positiveVolts().optional(),
  screenDissipation: quantity('W', { positive: true }).optional(),
  cathodeCurrent: quantity('A', { positive: true }).optional(),
  heaterCathodeVoltage: positiveVolts().optional(),
  gridResistanceFixedBias: ohms().optional(),
  gridResistanceCathodeBias: ohms().optional(),
});

const tubeCommon = {
  name: text().max(80).optional(),
  rgi: ohms().optional(),
  capacitances: capacitancesSchema.optional(),
  ratings: tubeRatingsSchema.optional(),
};

export const korenTriodeTubeSchema = z.object({
  model: z.literal('koren-triode'),
  mu: quantity('', { positive: true }),
  ex: quantity('', { positive: true, max: 5 }),
  kg1: quantity('', { positive: true }),
  kp: quantity('', { positive: true }),
  kvb: quantity('V²', { min: 0 }),
  vct: volts().optional(),
  ...tubeCommon,
});

export const korenPentodeTubeSchema = z.object({
  model: z.literal('koren-pentode'),
  mu: quantity('', { positive: true }),
  ex: quantity('', { positive: true, max: 5 }),
  kg1: quantity('', { positive: true }),
  kg2: quantity('', { positive: true }),
  kp: quantity('', { positive: true }),
  kvb: quantity('V', { positive: true }),
  vct: volts().optional(),
  ...tubeCommon,
});

/** Ideal 3/2-power triode: Ia = K·(Vg + Va/µ)^1.5. */
export const childLangmuirTubeSchema = z.object({
  model: z.literal('child-langmuir'),
  perveance: quantity('A/V^1.5', { positive: true }),
  mu: quantity('', { positive: true }),
  ...tubeCommon,
});

export const tubeSchema = z.discriminatedUnion('model', [
  korenTriodeTubeSchema,
  korenPentodeTubeSchema,
  childLangmuirTubeSchema,
]);
export type Tube = z.output<typeof tubeSchema>;
export type TubeInput = z.input<typeof tubeSchema>;

export const driveSchema = z.object({
  amplitude: quantity('V', { min: 0 }).default(0),
  frequency: quantity('Hz', { positive: true, max: 1e6 }).default(1000),
});

export const loadSchema = z.object({
  resistance: ohms(),
  couplingCapacitor: farads(),
});

const cathodeBias = z.object({
  kind: z.literal('cathode'),
  cathodeResistor: ohms(),
  cathodeBypass: farads().nullable().default(null),
});
const fixedBias = z.object({
  kind: z.literal('fixed'),
  fixedBias: quantity('V', { max: 0 }),
});
export const amplifierBiasSchema = z.discriminatedUnion('kind', [cathodeBias, fixedBias]);

export const screenSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('fixed'), supply: positiveVolts().optional() }),
  z.object({ kind: z.literal('resistor'), resistor: ohms(), bypass: farads().nullable().default(null) }),
]);

const common = {
  supply: positiveVolts(),
  gridResistor: ohms(),
  sourceResistance: ohms({ positive: false }).default(0),
  heaterElevation: volts().default(0),
  drive: driveSchema.default({ amplitude: 0, frequency: 1000 }),
  /** fraction of a rating above which the check reports 'near' */
  derating: quantity('', { positive: true, max: 1 }).default(0.7),
};

const commonCathode = z.object({
  topology: z.literal('common-cathode'),
  tube: tubeSchema,
  ...common,
  plateResistor: ohms(),
  bias: amplifierBiasSchema,
  load: loadSchema.optional(),
});

const cathodeFollower = z.object({
  topology: z.literal('cathode-follower'),
  tube: tubeSchema,
  ...common,
  bias: z.discriminatedUnion('kind', [
    z.object({ kind: z.literal('dc-coupled'), gridVoltage: volts() }),
    z.object({ kind: z.literal('self'), biasResistor: ohms() }),
  ]),
  cathodeResistor: ohms(),
  plateResistor: ohms({ positive: false }).default(0),
  load: loadSchema.optional(),
});

const pentodeAmplifier = z.object({
  topology: z.literal('pentode-amplifier'),
  tube: korenPentodeTubeSchema,
  ...common,
  plateResistor: ohms(),
  bias: amplifierBiasSchema,
  screen: screenSchema,
  load: loadSchema.optional(),
});

/** Output transformer beyond the ideal one: empty values are limits that are not modelled. */
export const outputTransformerSchema = z.object({
  /** speaker load the primary impedance is quoted for (4, 8, 16 Ω or any) */
  speakerLoad: ohms(),
  secondaryResistance: ohms({ positive: false }).nullable().default(null),
  primaryInductance: quantity('H', { positive: true }).nullable().default(null),
  leakageInductance: quantity('H', { positive: true }).nullable().default(null),
  windingCapacitance: quantity('F', { positive: true }).nullable().default(null),
});
export type OutputTransformer = z.output<typeof outputTransformerSchema>;

/**
 * Global feedback entered on the output stage it is taken from: from the speaker terminal into an unbypassed
 * resistor at the bottom of the project's first stage's cathode circuit. The stage analysis ignores it; the
 * project's chain closes the loop (lib/calc/feedback).
 */
export const stageFeedbackSchema = z.object({
  resistor: ohms(),
  shuntResistor: ohms(),
  capacitor: farads().nullable().default(null),
  polarity: z.enum(['auto', 'normal', 'reversed']).default('auto'),
});
export type StageFeedback = z.output<typeof stageFeedbackSchema>;

const singleEndedOutput = z.object({
  topology: z.literal('single-ended-output'),
  tube: tubeSchema,
  ...common,
  primaryImpedance: ohms(),
  primaryResistance: ohms({ positive: false }).default(0),
  bias: amplifierBiasSchema,
  screen: screenSchema.optional(),
  transformer: outputTransformerSchema.optional(),
  feedback: stageFeedbackSchema.optional(),
});

const pushPullOutput = z.object({
  topology: z.literal('push-pull-output'),
  tube: tubeSchema,
  ...common,
  class: z.enum(['A', 'AB']),
  plateToPlateImpedance: ohms(),
  primaryResistance: ohms({ positive: false }).default(0),
  bias: amplifierBiasSchema,
  screen: screenSchema.optional(),
  transformer: outputTransformerSchema.optional(),
  feedback: stageFeedbackSchema.optional(),
});

/**
 * Long-tailed pair (differential phase splitter): two sections of one triode type with a common cathode circuit.
 * Grid 1 is driven; grid 2 is held at AC ground by its capacitor. Plate 1 is the inverting output, plate 2 the
 * non-inverting one.
 */
const longTailedPair = z.object({
  topology: z.literal('long-tailed-pair'),
  tube: tubeSchema,
  ...common,
  plateResistors: z.object({ inverting: ohms(), nonInverting: ohms() }),
  tail: z.discriminatedUnion('kind', [
    z.object({
      kind: z.literal('resistor'),
      /** shared bias resistor between the joined cathodes and the tap (0: none) */
      biasResistor: ohms({ positive: false }).default(0),
      tailResistor: ohms(),
      /** where the tail returns: 0 (ground) or a negative supply */
      tailSupply: quantity('V', { max: 0 }).default(0),
    }),
    z.object({ kind: z.literal('current-source'), current: quantity('A', { positive: true }) }),
  ]),
  grids: z.discriminatedUnion('kind', [
    /** both grid resistors return to the tap between the bias resistor and the tail (input AC-coupled) */
    z.object({ kind: z.literal('bias-tap') }),
    /** grids sit at a DC potential (grid 1 DC-coupled from the previous plate, grid 2 referenced to the same) */
    z.object({ kind: z.literal('dc'), gridVoltage: volts() }),
  ]),
  /** grid 2 to ground */
  secondGridBypass: farads(),
  /** the next stage's grid resistor on each output, through a coupling capacitor */
  load: loadSchema.optional(),
});

/**
 * Split-load (concertina) phase splitter: plate and cathode loads, a bias resistor between the cathode and the
 * cathode load; the grid resistor returns to their junction (bootstrapped) or the grid is DC-coupled.
 */
const splitLoad = z.object({
  topology: z.literal('split-load'),
  tube: tubeSchema,
  ...common,
  plateResistor: ohms(),
  /** the cathode load below the bias resistor (normally equal to the plate resistor) */
  cathodeResistor: ohms(),
  biasResistor: ohms({ positive: false }).default(0),
  bias: z.discriminatedUnion('kind', [
    z.object({ kind: z.literal('bootstrapped') }),
    z.object({ kind: z.literal('dc-coupled'), gridVoltage: volts() }),
  ]),
  load: loadSchema.optional(),
});

type Issue = { path: (string | number)[]; message: string };

function crossFieldIssues(stage: Record<string, unknown> & { topology: string }): Issue[] {
  const issues: Issue[] = [];
  const s = stage as Record<string, any>;
  if (s.topology === 'cathode-follower' && s.bias?.kind === 'self' && !(s.bias.biasResistor < s.cathodeResistor)) {
    issues.push({ path: ['bias', 'biasResistor'], message: 'must be smaller than the total cathode resistor' });
  }
  if (s.topology === 'cathode-follower' && s.bias?.kind === 'dc-coupled' && !(s.bias.gridVoltage < s.supply)) {
    issues.push({ path: ['bias', 'gridVoltage'], message: 'must be below the supply voltage' });
  }
  const screenSupply = s.screen?.kind === 'fixed' ? s.screen.supply : undefined;
  if (typeof screenSupply === 'number' && screenSupply > s.supply * 1.5) {
    issues.push({ path: ['screen', 'supply'], message: 'is far above the plate supply; check the value' });
  }
  if (s.tube && (s.topology === 'single-ended-output' || s.topology === 'push-pull-output')) {
    if (s.tube.model === 'koren-pentode' && !s.screen) {
      issues.push({ path: ['screen'], message: 'is required for a pentode or beam tetrode' });
    }
  }
  if (s.topology === 'long-tailed-pair') {
    if (s.tail?.kind === 'current-source' && s.grids?.kind === 'bias-tap') {
      issues.push({ path: ['grids', 'kind'], message: 'a current-source tail has no bias tap: give the grids a DC potential' });
    }
    if (s.tail?.kind === 'resistor' && s.grids?.kind === 'bias-tap' && !(s.tail.biasResistor > 0)) {
      issues.push({ path: ['tail', 'biasResistor'], message: 'is needed when the grids return to the bias tap' });
    }
    if (s.grids?.kind === 'dc' && !(s.grids.gridVoltage < s.supply)) {
      issues.push({ path: ['grids', 'gridVoltage'], message: 'must be below the supply voltage' });
    }
  }
  if (s.topology === 'split-load' && s.bias?.kind === 'dc-coupled' && !(s.bias.gridVoltage < s.supply)) {
    issues.push({ path: ['bias', 'gridVoltage'], message: 'must be below the supply voltage' });
  }
  if (s.tube?.model === 'koren-pentode' && (s.topology === 'long-tailed-pair' || s.topology === 'split-load')) {
    issues.push({ path: ['tube'], message: 'must be a triode for a phase splitter' });
  }
  return issues;
}

function withCrossChecks<T extends z.ZodType<Record<string, unknown> & { topology: string }>>(schema: T) {
  return schema.superRefine((value, ctx) => {
    for (const issue of crossFieldIssues(value)) ctx.addIssue({ code: 'custom', ...issue });
  });
}

export const stageMemberSchemas = {
  'common-cathode': commonCathode,
  'cathode-follower': cathodeFollower,
  'pentode-amplifier': pentodeAmplifier,
  'single-ended-output': singleEndedOutput,
  'push-pull-output': pushPullOutput,
  'long-tailed-pair': longTailedPair,
  'split-load': splitLoad,
} as const;

export const stageInputSchema = withCrossChecks(
  z.discriminatedUnion('topology', [commonCathode, cathodeFollower, pentodeAmplifier, singleEndedOutput, pushPullOutput, longTailedPair, splitLoad]),
);

const tubeId = z.number().int().positive().max(2_147_483_647, "Not a valid id.");

/** HTTP body variant: the route substitutes the library tube for `tubeId` before calling the engine. */
export const stageBodySchema = withCrossChecks(
  z.discriminatedUnion('topology', [
    commonCathode.omit({ tube: true }).extend({ tubeId }),
    cathodeFollower.omit({ tube: true }).extend({ tubeId }),
    pentodeAmplifier.omit({ tube: true }).extend({ tubeId }),
    singleEndedOutput.omit({ tube: true }).extend({ tubeId }),
    pushPullOutput.omit({ tube: true }).extend({ tubeId }),
    longTailedPair.omit({ tube: true }).extend({ tubeId }),
    splitLoad.omit({ tube: true }).extend({ tubeId }),
  ]),
);

export type StageInput = z.output<typeof stageInputSchema>;
export type StageInputRaw = z.input<typeof stageInputSchema>;
export type StageBody = z.output<typeof stageBodySchema>;
export type Topology = StageInput['topology'];
export type CommonCathodeInput = Extract<StageInput, { topology: 'common-cathode' }>;
export type CathodeFollowerInput = Extract<StageInput, { topology: 'cathode-follower' }>;
export type PentodeAmplifierInput = Extract<StageInput, { topology: 'pentode-amplifier' }>;
export type SingleEndedOutputInput = Extract<StageInput, { topology: 'single-ended-output' }>;
export type PushPullOutputInput = Extract<StageInput, { topology: 'push-pull-output' }>;
export type LongTailedPairInput = Extract<StageInput, { topology: 'long-tailed-pair' }>;
export type SplitLoadInput = Extract<StageInput, { topology: 'split-load' }>;
export type AmplifierBias = z.output<typeof amplifierBiasSchema>;
export type Screen = z.output<typeof screenSchema>;
