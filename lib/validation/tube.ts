// Tube library: the schemas shared by the /api/tubes routes and the tube forms. SI units throughout;
// numeric fields accept engineering notation ('300', '1M', '2m2') through quantity().
import { z } from 'zod';
import { text } from './text';
import { acceptFitSchema } from './curve-set';
import { idNumber, idText } from './ids';
import { quantity } from './quantity';
import { tubeRatingsSchema } from '../calc/input';

export const TUBE_FAMILIES = ['triode', 'pentode', 'beam-tetrode'] as const;
export type TubeFamily = (typeof TUBE_FAMILIES)[number];
export const FAMILY_LABELS: Record<TubeFamily, string> = { triode: 'Triode', pentode: 'Pentode', 'beam-tetrode': 'Beam tetrode' };

export const MODEL_KINDS = ['koren-triode', 'koren-pentode'] as const;
export type ModelKind = (typeof MODEL_KINDS)[number];
export const MODEL_KIND_LABELS: Record<ModelKind, string> = { 'koren-triode': 'Koren triode', 'koren-pentode': 'Koren pentode' };

/** Where a value comes from: a citation, "entered by hand", "from memory", "fitted from curve set N". */
export const sourceSchema = text().trim().min(1, 'Say where this value comes from (e.g. "entered by hand").').max(300);

const optionalText = (max: number) =>
  text()
    .trim()
    .max(max)
    .optional()
    .transform((v) => (v === '' ? undefined : v));

const sourced = (unit: string) => z.object({ value: quantity(unit, { positive: true }), source: sourceSchema });

/** The ratings the engine checks, in its order: the keys of its own tube-ratings schema (lib/calc/input.ts). */
export const RATING_KEYS = Object.keys(tubeRatingsSchema.shape) as (keyof typeof tubeRatingsSchema.shape)[];
export type RatingKey = (typeof RATING_KEYS)[number];

export const RATING_META: Record<RatingKey, { label: string; short: string; unit: string }> = {
  plateVoltage: { label: 'Plate voltage', short: 'Va max', unit: 'V' },
  plateDissipation: { label: 'Plate dissipation', short: 'Pa max', unit: 'W' },
  screenVoltage: { label: 'Screen voltage', short: 'Vg2 max', unit: 'V' },
  screenDissipation: { label: 'Screen dissipation', short: 'Pg2 max', unit: 'W' },
  cathodeCurrent: { label: 'Cathode current', short: 'Ik max', unit: 'A' },
  heaterCathodeVoltage: { label: 'Heater–cathode voltage', short: 'Vhk max', unit: 'V' },
  gridResistanceFixedBias: { label: 'Grid resistance, fixed bias', short: 'Rg fixed', unit: 'Ω' },
  gridResistanceCathodeBias: { label: 'Grid resistance, cathode bias', short: 'Rg cathode', unit: 'Ω' },
};

export const ratingsSchema = z.object(
  Object.fromEntries(RATING_KEYS.map((k) => [k, sourced(RATING_META[k].unit).optional()])) as Record<RatingKey, z.ZodOptional<ReturnType<typeof sourced>>>,
);

export const heaterSchema = z.object({
  voltage: quantity('V', { positive: true }).optional(),
  current: quantity('A', { positive: true }).optional(),
  directlyHeated: z.boolean().default(false),
  source: optionalText(300),
});

export const typeCapacitancesSchema = z.object({
  cgk: quantity('F', { min: 0 }).optional(),
  cga: quantity('F', { min: 0 }).optional(),
  cak: quantity('F', { min: 0 }).optional(),
  source: optionalText(300),
});

export const typicalPointSchema = z.object({
  label: text().trim().min(1, 'Give the point a label.').max(200),
  plateVoltage: quantity('V', { positive: true }),
  gridVoltage: quantity('V'),
  plateCurrent: quantity('A', { min: 0 }),
  screenVoltage: quantity('V', { positive: true }).optional(),
  screenCurrent: quantity('A', { min: 0 }).optional(),
  mu: quantity('', { positive: true }).optional(),
  ra: quantity('Ω', { positive: true }).optional(),
  gm: quantity('S', { positive: true }).optional(),
  source: sourceSchema,
});

const korenCommon = {
  mu: quantity('', { positive: true, max: 1000 }),
  ex: quantity('', { positive: true, max: 5 }),
  kg1: quantity('', { positive: true }),
  kp: quantity('', { positive: true }),
  vct: quantity('V', { min: -5, max: 5 }).optional(),
  rgi: quantity('Ω', { positive: true }).optional(),
};
export const korenTriodeParamsSchema = z.object({ ...korenCommon, kvb: quantity('V²', { min: 0 }) });
export const korenPentodeParamsSchema = z.object({ ...korenCommon, kg2: quantity('', { positive: true }), kvb: quantity('V', { positive: true }) });

const modelCommon = {
  name: text().trim().min(1, 'Give the model a name.').max(120),
  source: sourceSchema.default('entered by hand'),
  setDefault: z.boolean().optional(),
};
/** A model typed in by hand (fitted models come from POST /api/curve-sets/{id}/accept). */
export const modelInputSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('koren-triode'), parameters: korenTriodeParamsSchema, ...modelCommon }),
  z.object({ kind: z.literal('koren-pentode'), parameters: korenPentodeParamsSchema, ...modelCommon }),
]);
export type ModelInput = z.input<typeof modelInputSchema>;
export type ModelValues = z.output<typeof modelInputSchema>;

export const updateModelSchema = z
  .object({
    name: text().trim().min(1).max(120).optional(),
    source: sourceSchema.optional(),
    setDefault: z.literal(true, { message: 'Only true: make another model the default instead of clearing one.' }).optional(),
  })
  .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change.' });
export type UpdateModelInput = z.input<typeof updateModelSchema>;

const aliasesSchema = z
  .union([z.array(text()), text()])
  .transform((v) => (Array.isArray(v) ? v : v.split(/[,;/]/)).map((s) => s.trim()).filter(Boolean))
  .pipe(z.array(text().max(60, 'An alias is at most 60 characters.')).max(12, 'At most 12 aliases.'));

const tubeFields = {
  designation: text()
    .trim()
    .min(1, 'Enter the designation, e.g. 12AX7.')
    .max(60)
    .regex(/^[A-Za-z0-9][A-Za-z0-9 ./()+-]*$/, 'Use letters, digits, spaces and . / ( ) + - only.'),
  aliases: aliasesSchema.default([]),
  family: z.enum(TUBE_FAMILIES, { message: 'Choose triode, pentode or beam tetrode.' }),
  sections: z.coerce.number().int('Whole number of sections.').min(1, 'At least one section.').max(4, 'At most 4 sections.').default(1),
  heater: heaterSchema.prefault({}),
  ratings: ratingsSchema.default({}),
  capacitances: typeCapacitancesSchema.prefault({}),
  typicalPoints: z.array(typicalPointSchema).max(20).default([]),
  notes: text().trim().max(5000).default(''),
};

export const createTubeSchema = z.object({ ...tubeFields, model: modelInputSchema.optional() });
export type CreateTubeInput = z.input<typeof createTubeSchema>;
export type CreateTubeValues = z.output<typeof createTubeSchema>;

export const updateTubeSchema = z
  .object({
    designation: tubeFields.designation.optional(),
    aliases: aliasesSchema.optional(),
    family: tubeFields.family.optional(),
    sections: z.coerce.number().int().min(1).max(4).optional(),
    heater: heaterSchema.optional(),
    ratings: ratingsSchema.optional(),
    capacitances: typeCapacitancesSchema.optional(),
    typicalPoints: z.array(typicalPointSchema).max(20).optional(),
    notes: text().trim().max(5000).optional(),
    retired: z.boolean().optional(),
    published: z.boolean().optional(),
  })
  .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change.' });
export type UpdateTubeInput = z.input<typeof updateTubeSchema>;
export type UpdateTubeValues = z.output<typeof updateTubeSchema>;

export const tubeListQuerySchema = z.object({
  search: text().trim().max(100).optional(),
  family: z.enum(TUBE_FAMILIES).optional(),
  includeRetired: z
    .enum(['true', 'false', '1', '0'], { message: 'Use true or false.' })
    .optional()
    .transform((v) => v === 'true' || v === '1'),
  page: z.coerce.number().int().min(1, 'Pages start at 1.').default(1),
  pageSize: z.coerce.number().int().min(1).max(200, 'At most 200 per page.').default(50),
});
export type TubeListQuery = z.output<typeof tubeListQuerySchema>;

export const compareQuerySchema = z.object({
  ids: text()
    .transform((s) => s.split(','))
    .pipe(z.array(idText()).min(2, 'Choose two or three types.').max(3, 'Choose two or three types.')),
  vaMax: quantity('V', { positive: true, max: 2000 }).optional(),
});

/** POST /api/curve-sets/{id}/accept: the shared accept fields plus which fit (the latest proposed one when omitted). */
export const acceptFitBodySchema = acceptFitSchema.extend({ fitId: idNumber().optional() });
export const discardFitBodySchema = z.object({ fitId: idNumber().optional() });

export const tubeIdParamSchema = z.object({ id: idText() });
export const tubeModelParamSchema = z.object({ id: idText(), modelId: idText() });

export const MAX_ATTACHMENT_BYTES = 20 * 1024 * 1024;
export const attachmentFieldsSchema = z.object({ kind: z.enum(['datasheet', 'other']).default('datasheet') });
