// Exploration requests (tolerance runs, tube swaps, part searches): the route's body and the Explore forms.
// Tolerances and spreads are fractions (0.05 = 5 %); the forms show percent.
import { z } from 'zod';
import { idNumber, idText } from './ids';
import { quantity } from './quantity';

export const EXPLORE_KINDS = ['tolerance', 'swap', 'search'] as const;
export const EXPLORE_METRICS = [
  'plateCurrent',
  'plateCathodeVoltage',
  'plateVoltage',
  'cathodeVoltage',
  'gridCathodeVoltage',
  'screenCurrent',
  'plateDissipationShare',
  'screenDissipationShare',
  'gain',
  'headroom',
  'thd',
  'outputPower',
  'splitterBalance',
] as const;
export const SERIES_NAMES = ['E12', 'E24', 'E96'] as const;
export const MAX_TRIALS = 200_000;
export const MAX_CANDIDATES = 1_000_000;

const fraction = (max = 0.99) => z.number({ message: 'must be a number' }).min(0, 'must be at least 0 %').max(max, `must be at most ${Math.round(max * 100)} %`);
const band = z.object({ minus: fraction(), plus: fraction(1) });
const seed = z.number({ message: 'must be a whole number' }).int('must be a whole number').min(0).max(2_147_483_647).optional();
const target = z
  .object({ stageId: idNumber().optional(), projectId: idNumber().optional() })
  .refine((t) => (t.stageId === undefined) !== (t.projectId === undefined), { message: 'Name either a stage or a project (a whole chain).', path: ['stageId'] });

export const toleranceOptionsSchema = z.object({
  trials: z.number({ message: 'must be a number' }).int('must be a whole number').min(100, 'must be at least 100').max(MAX_TRIALS, `must be at most ${MAX_TRIALS.toLocaleString('en')}`),
  seed,
  distribution: z.enum(['normal', 'uniform']).default('normal'),
  resistorTolerance: fraction(0.5).optional(),
  capacitorTolerance: band.optional(),
  /** per part path (`plateResistor`, `bias.cathodeResistor`; for a chain `stageId:path`) */
  parts: z.record(z.string().max(80), band).optional(),
  mains: band.optional(),
  tubeSpread: fraction(0.9).optional(),
});

export const freePartSchema = z
  .object({
    path: z.string().min(1).max(80),
    min: quantity('', { positive: true }),
    max: quantity('', { positive: true }),
    series: z.enum(SERIES_NAMES),
  })
  .refine((f) => f.max >= f.min, { message: 'must not be below the lower limit', path: ['max'] });

const metric = z.enum(EXPLORE_METRICS);
const objective = z.object({ metric, direction: z.enum(['maximize', 'minimize']) });

export const searchOptionsSchema = z.object({
  free: z.array(freePartSchema).min(1, 'Mark at least one part as free.').max(6, 'At most six free parts.'),
  constraints: z.array(z.object({ metric, op: z.enum(['atLeast', 'atMost']), value: z.number({ message: 'must be a number' }).finite() })).max(8),
  objective,
  tradeoff: z.tuple([objective, objective]).optional(),
  /** V peak at the output for THD and the other large-signal results; absent: the stage's own drive */
  outputLevel: quantity('V', { positive: true }).nullable().optional(),
  maxEvaluations: z.number({ message: 'must be a number' }).int().min(10).max(MAX_CANDIDATES).default(100_000),
  seed,
});

export const createExploreRunSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('tolerance'), target, options: toleranceOptionsSchema }),
  z.object({ kind: z.literal('swap'), target }),
  z.object({ kind: z.literal('search'), target, options: searchOptionsSchema }),
]);
export type CreateExploreRun = z.output<typeof createExploreRunSchema>;
export type CreateExploreRunInput = z.input<typeof createExploreRunSchema>;

export const exploreRunParamsSchema = z.object({ id: idText() });
export const exploreRunListQuerySchema = z.object({
  stageId: idText().optional(),
  projectId: idText().optional(),
  kind: z.enum(EXPLORE_KINDS).optional(),
});
