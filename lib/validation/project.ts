import { z } from 'zod';
import { text } from './text';
import { idNumber, idText, intCounter } from './ids';
import { quantity } from './quantity';
import { stageBodySchema } from './stage';
import { supplyCircuitSchema } from './supply';
import { chainLinkSchema } from '../calc/chain/input';
import { CURVE_KINDS } from '@/lib/report/curve-kinds';
import { BENCH_QUANTITY_KEYS, type BenchQuantity } from '@/lib/calc/bench';

export const PROJECT_STATUSES = ['draft', 'in-review', 'approved', 'changes-requested'] as const;
export type ProjectStatus = (typeof PROJECT_STATUSES)[number];

const key = z
  .string()
  .trim()
  .min(1, 'Give it a short key.')
  .max(40, 'Keep the key under 40 characters.')
  .regex(/^[A-Za-z0-9+_.-]+$/, 'Use letters, digits, + - _ . only (e.g. B+2).');

export const supplyNodeSchema = z.object({
  key,
  name: text().trim().min(1, 'Name the node.').max(80),
  /** resistance between the previous node (or the raw supply) and this one; 0 for the reservoir node */
  droppingResistor: quantity('Ω', { min: 0 }),
  filterCapacitor: quantity('F', { min: 0 }),
});

export const heaterSupplySchema = z.object({
  key,
  name: text().trim().min(1, 'Name the heater supply.').max(80),
  voltage: quantity('V', { positive: true, max: 200 }),
});

function uniqueKeys(items: { key: string }[], ctx: z.RefinementCtx, field: string) {
  const seen = new Set<string>();
  items.forEach((item, i) => {
    if (seen.has(item.key)) ctx.addIssue({ code: 'custom', path: [field, i, 'key'], message: `The key '${item.key}' is used twice.` });
    seen.add(item.key);
  });
}

export const projectSupplySchema = z
  .object({
    /** raw B+ at the rectifier, unloaded equivalent source voltage */
    rawVoltage: quantity('V', { positive: true, max: 2000 }).optional(),
    /** transformer + rectifier equivalent series resistance */
    sourceResistance: quantity('Ω', { min: 0 }).default(0),
    nodes: z.array(supplyNodeSchema).max(12, 'At most 12 B+ nodes.').default([]),
    heaters: z.array(heaterSupplySchema).max(6, 'At most 6 heater supplies.').default([]),
  })
  .superRefine((s, ctx) => {
    uniqueKeys(s.nodes, ctx, 'nodes');
    uniqueKeys(s.heaters, ctx, 'heaters');
    if (s.nodes.length > 0 && s.rawVoltage === undefined) {
      ctx.addIssue({ code: 'custom', path: ['rawVoltage'], message: 'Give the raw B+ voltage for the nodes to be solved.' });
    }
  });
export type ProjectSupply = z.output<typeof projectSupplySchema>;
export type ProjectSupplyInput = z.input<typeof projectSupplySchema>;

const projectName = text().trim().min(1, 'Give the project a name.').max(120, 'Keep the name under 120 characters.');
const description = text().trim().max(4000, 'Keep the description under 4000 characters.');

export const createProjectSchema = z.object({
  name: projectName,
  description: description.optional(),
  supply: projectSupplySchema.optional(),
});
export type CreateProjectInput = z.input<typeof createProjectSchema>;

/** The quantities a bench check compares (the keys of lib/calc/bench's BENCH_QUANTITIES; validation imports only zod). */
/** The bench check's own list of compared quantities (lib/calc/bench.ts). */
export const BENCH_TOLERANCE_KEYS = BENCH_QUANTITY_KEYS;
export type BenchToleranceKey = BenchQuantity;

/** Per-project bench tolerances as fractions (0.05 = ±5 %); a quantity left out uses the ±10 % default. The settings card enters percent. */
export const benchTolerancesSchema = z.partialRecord(
  z.enum(BENCH_TOLERANCE_KEYS, { message: 'not a quantity the bench check compares' }),
  z.number({ message: 'must be a number' }).gt(0, 'must be above 0 %').max(1, 'must be at most 100 %'),
);

export const updateProjectSchema = z
  .object({
    version: intCounter('Send the version you read.'),
    name: projectName.optional(),
    description: description.optional(),
    archived: z.boolean().optional(),
    supply: projectSupplySchema.optional(),
    /** the supply as a circuit; null returns the project to the resistor ladder */
    supplyCircuit: supplyCircuitSchema.nullable().optional(),
    chainLinks: z.array(chainLinkSchema).max(40).nullable().optional(),
    benchTolerances: benchTolerancesSchema.optional(),
    watchers: z.array(idNumber()).max(50).optional(),
  })
  .refine((v) => Object.keys(v).some((k) => k !== 'version'), { message: 'Nothing to change.' });
export type UpdateProjectInput = z.input<typeof updateProjectSchema>;

/** rename form on the project page */
export const renameProjectSchema = z.object({ name: projectName, description: description.optional() });
export type RenameProjectInput = z.input<typeof renameProjectSchema>;

const booleanQuery = z.enum(['true', 'false', 'all']).default('false');

export const listProjectsQuerySchema = z.object({
  search: text().trim().max(120).optional(),
  status: z.union([z.enum(PROJECT_STATUSES), z.literal('')]).optional(),
  archived: booleanQuery,
});
export type ListProjectsQuery = z.output<typeof listProjectsQuerySchema>;

export const stageMetaSchema = z.object({
  name: text().trim().min(1, 'Name the stage.').max(120),
  supplyNode: text().trim().max(40).nullable().optional(),
  position: intCounter().optional(),
  tubeModelId: idNumber().nullable().optional(),
});

/** POST /api/projects/{id}/stages: the stage body (engine inputs with tubeId) plus its name and place in the chain. */
export const createStageSchema = z.intersection(stageBodySchema, stageMetaSchema);
export type CreateStageInput = z.input<typeof createStageSchema>;

/**
 * PATCH /api/stages/{id}: `inputs` is a partial stage body merged shallowly over the stored one and then
 * validated in full with stageBodySchema (field errors keyed by the stage body's own paths, e.g. bias.cathodeResistor).
 */
export const updateStageSchema = z
  .object({
    version: intCounter('Send the version you read.'),
    name: stageMetaSchema.shape.name.optional(),
    supplyNode: stageMetaSchema.shape.supplyNode,
    position: stageMetaSchema.shape.position,
    tubeModelId: stageMetaSchema.shape.tubeModelId,
    inputs: z.record(text(), z.unknown()).optional(),
  })
  .refine((v) => Object.keys(v).some((k) => k !== 'version'), { message: 'Nothing to change.' });
export type UpdateStageInput = z.input<typeof updateStageSchema>;

export const deleteStageQuerySchema = z.object({ version: idText('Send the version you read.') });

/** chain view: the chain input level in V rms (engineering notation allowed: 100m) */
export const chainQuerySchema = z.object({
  input: quantity('V', { positive: true, max: 100 }).default(0.1),
});
export type ChainQuery = z.output<typeof chainQuerySchema>;

export const curvesQuerySchema = z.object({ kind: z.enum(CURVE_KINDS, { message: `Choose one of ${CURVE_KINDS.join(', ')}.` }) });
