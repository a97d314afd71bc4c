import { z } from 'zod';
import { stageInputSchema, type StageInput } from '../input';
import { quantity } from '../../validation/quantity';
import { feedbackSchema } from '../feedback/circuit';

/** A volume control: a potentiometer from the signal to ground, the wiper feeding the next element. */
export const volumeControlSchema = z.object({
  topology: z.literal('volume-control'),
  resistance: quantity('Ω', { positive: true }),
  taper: z.enum(['log', 'linear']).default('log'),
  /** rotation, 0 (fully down) … 1 (fully up) */
  setting: quantity('', { min: 0, max: 1 }),
});

/** One branch of a ladder network: a resistor, a capacitor, or both (in series or in parallel). */
export const rcBranchSchema = z
  .object({
    position: z.enum(['series', 'shunt']),
    resistance: quantity('Ω', { positive: true }).optional(),
    capacitance: quantity('F', { positive: true }).optional(),
    arrangement: z.enum(['series', 'parallel']).default('parallel'),
  })
  .refine((b) => b.resistance !== undefined || b.capacitance !== undefined, {
    message: 'needs a resistance, a capacitance or both',
    path: ['resistance'],
  });

/** A passive network drawn as series and shunt branches, in signal order (a tone or shelving network). */
export const rcNetworkSchema = z.object({
  topology: z.literal('rc-network'),
  branches: z.array(rcBranchSchema).min(1).max(20),
});

export const passiveSchema = z.discriminatedUnion('topology', [volumeControlSchema, rcNetworkSchema]);
export type PassiveInput = z.output<typeof passiveSchema>;
export type VolumeControlInput = z.output<typeof volumeControlSchema>;
export type RcNetworkInput = z.output<typeof rcNetworkSchema>;

export const PASSIVE_TOPOLOGIES = ['volume-control', 'rc-network'] as const;

const stageId = z.union([z.string().trim().min(1).max(40), z.number().int()]).transform((v) => String(v));

/** A chain element: a stage input as for a single stage (its own drive is ignored) or a passive network, with an id. */
export const chainStageSchema = z
  .object({ id: stageId, topology: z.string() })
  .passthrough()
  .transform((value, ctx): ChainElement => {
    const { id, ...rest } = value;
    const passive = (PASSIVE_TOPOLOGIES as readonly string[]).includes(value.topology);
    const parsed = passive ? passiveSchema.safeParse(rest) : stageInputSchema.safeParse(rest);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) ctx.addIssue({ code: 'custom', message: issue.message, path: issue.path as (string | number)[] });
      return z.NEVER;
    }
    return { id, ...(parsed.data as StageInput | PassiveInput) } as ChainElement;
  });

export const couplingSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('capacitor'), capacitance: quantity('F', { positive: true }) }),
  z.object({ kind: z.literal('direct') }),
]);

export const chainLinkSchema = z.object({
  from: stageId,
  /** output of the source stage (default: its main output) */
  output: z.string().max(40).optional(),
  to: stageId,
  /** input of the destination (default: grid, or in for a passive network) */
  input: z.string().max(40).optional(),
  coupling: couplingSchema.default({ kind: 'capacitor', capacitance: 100e-9 }),
});

export const chainInputSchema = z
  .object({
    input: z.object({
      /** source EMF, V peak */
      amplitude: quantity('V', { min: 0 }),
      frequency: quantity('Hz', { positive: true, max: 200e3 }).default(1000),
    }),
    stages: z.array(chainStageSchema).min(1).max(12),
    /** omitted: capacitor coupling (100 nF) between consecutive elements */
    links: z.array(chainLinkSchema).max(40).optional(),
    /** global negative feedback from an output stage's speaker terminal to an earlier stage's cathode */
    feedback: feedbackSchema.optional(),
  })
  .superRefine((chain, ctx) => {
    const ids = new Set<string>();
    chain.stages.forEach((s, i) => {
      if (ids.has(s.id)) ctx.addIssue({ code: 'custom', path: ['stages', i, 'id'], message: `duplicate id '${s.id}'` });
      ids.add(s.id);
    });
    chain.links?.forEach((l, i) => {
      if (!ids.has(l.from)) ctx.addIssue({ code: 'custom', path: ['links', i, 'from'], message: `no element with id '${l.from}'` });
      if (!ids.has(l.to)) ctx.addIssue({ code: 'custom', path: ['links', i, 'to'], message: `no element with id '${l.to}'` });
      if (l.from === l.to) ctx.addIssue({ code: 'custom', path: ['links', i, 'to'], message: 'a link cannot return to its own element' });
    });
    const fb = chain.feedback;
    if (fb) {
      if (!ids.has(fb.from)) ctx.addIssue({ code: 'custom', path: ['feedback', 'from'], message: `no element with id '${fb.from}'` });
      if (!ids.has(fb.to)) ctx.addIssue({ code: 'custom', path: ['feedback', 'to'], message: `no element with id '${fb.to}'` });
      if (fb.dominantPole && !ids.has(fb.dominantPole.stage)) {
        ctx.addIssue({ code: 'custom', path: ['feedback', 'dominantPole', 'stage'], message: `no element with id '${fb.dominantPole.stage}'` });
      }
    }
  });

export type ChainElement = { id: string } & (StageInput | PassiveInput);
export type ChainLink = z.output<typeof chainLinkSchema>;
export type ChainInput = z.output<typeof chainInputSchema>;
export type ChainInputRaw = z.input<typeof chainInputSchema>;
