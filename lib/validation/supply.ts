// The supply circuit (mains winding → rectifier → reservoir → sections → nodes) as sent by the supply editor and
// by POST /api/analyze-supply. Values accept SI numbers or engineering notation ('47u', '4k7').
import { z } from 'zod';
import { quantity } from './quantity';

export const RECTIFIER_KINDS = ['silicon-bridge', 'silicon-centre-tap', 'vacuum'] as const;
export type RectifierKindInput = (typeof RECTIFIER_KINDS)[number];

const nodeKey = z
  .string()
  .trim()
  .min(1, 'Give the node a short key.')
  .max(40, 'Keep the key under 40 characters.')
  .regex(/^[A-Za-z0-9+_.-]+$/, 'Use letters, digits, + - _ . only (e.g. B+2).');

const capacitorFields = {
  capacitance: quantity('F', { positive: true, max: 1 }),
  voltageRating: quantity('V', { positive: true, max: 20000 }).optional(),
  key: nodeKey.optional(),
  name: z.string().trim().max(80, 'Keep the name under 80 characters.').optional(),
};

export const supplyCapacitorSchema = z.object(capacitorFields);

export const supplySectionSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('resistor'), resistance: quantity('Ω', { positive: true, max: 1e7 }), powerRating: quantity('W', { positive: true, max: 1000 }).optional() }),
    z.object({
      kind: z.literal('choke'),
      inductance: quantity('H', { positive: true, max: 1000 }),
      resistance: quantity('Ω', { min: 0, max: 1e5 }),
      currentRating: quantity('A', { positive: true, max: 100 }).optional(),
    }),
    z.object({ kind: z.literal('capacitor'), ...capacitorFields }),
  ],
  { message: "Each section is a 'resistor', a 'choke' or a 'capacitor'." },
);

export const supplyLoadSchema = z
  .object({
    node: z.number({ message: 'Give the node index (0 is the reservoir).' }).int('The node is a whole number.').min(0, 'Nodes start at 0.'),
    current: quantity('A', { min: 0, max: 20 }).optional(),
    fullDriveCurrent: quantity('A', { min: 0, max: 20 }).optional(),
    resistance: quantity('Ω', { positive: true, max: 1e9 }).optional(),
    label: z.string().trim().max(80).optional(),
  })
  .refine((l) => l.current !== undefined || l.resistance !== undefined, { message: 'Give a current, a resistance, or both.', path: ['current'] });

const frequency = z.union([z.literal(50), z.literal(60)], { message: 'The mains frequency is 50 or 60 Hz.' });

export const supplyCircuitSchema = z
  .object({
    mains: z.object({
      voltage: quantity('V', { positive: true, max: 1000 }),
      frequency,
      /** fraction, e.g. 0.1 for ±10 % */
      variation: z.number({ message: 'The mains variation is a fraction, e.g. 0.1 for ±10 %.' }).min(0, 'At least 0.').max(0.3, 'At most 0.3 (±30 %).').default(0.1),
    }),
    secondary: z.object({
      voltage: quantity('V', { positive: true, max: 5000 }),
      resistance: quantity('Ω', { min: 0, max: 1e5 }),
      primaryResistance: quantity('Ω', { min: 0, max: 1e4 }).optional(),
      currentRating: quantity('A', { positive: true, max: 100 }).optional(),
    }),
    rectifier: z.object({
      kind: z.enum(RECTIFIER_KINDS, { message: `Choose one of ${RECTIFIER_KINDS.join(', ')}.` }),
      type: z.string().trim().max(20).optional(),
    }),
    reservoir: supplyCapacitorSchema.nullable().optional(),
    sections: z.array(supplySectionSchema).max(24, 'At most 24 sections.').default([]),
    loads: z.array(supplyLoadSchema).max(60, 'At most 60 loads.').default([]),
  })
  .superRefine((c, ctx) => {
    if (c.rectifier.kind === 'vacuum' && !c.rectifier.type) ctx.addIssue({ code: 'custom', path: ['rectifier', 'type'], message: 'Choose the vacuum rectifier type (e.g. 5AR4).' });
    // the node structure the solver needs: capacitors make nodes, series parts sit between them
    let nodes = c.reservoir ? 1 : 0;
    let pending = 0;
    let inductive = false;
    c.sections.forEach((s, i) => {
      if (s.kind === 'capacitor') {
        if (nodes > 0 && pending === 0) ctx.addIssue({ code: 'custom', path: ['sections', i], message: 'A capacitor right after another capacitor: combine them into one.' });
        if (nodes === 0 && !inductive) ctx.addIssue({ code: 'custom', path: ['sections', i], message: 'Without a reservoir the filter must start with a choke.' });
        nodes++;
        pending = 0;
        inductive = false;
      } else {
        pending++;
        if (s.kind === 'choke') inductive = true;
      }
    });
    if (pending > 0) ctx.addIssue({ code: 'custom', path: ['sections', c.sections.length - 1], message: 'End the filter with a shunt capacitor (the node the stages draw from).' });
    if (nodes === 0) ctx.addIssue({ code: 'custom', path: ['reservoir'], message: 'Give a reservoir capacitor, or start the sections with a choke followed by a capacitor.' });
    c.loads.forEach((l, i) => {
      if (l.node >= nodes && nodes > 0) ctx.addIssue({ code: 'custom', path: ['loads', i, 'node'], message: `The supply has nodes 0–${nodes - 1}.` });
    });
    const keys = new Set<string>();
    const caps = [...(c.reservoir ? [{ key: c.reservoir.key, at: ['reservoir', 'key'] as (string | number)[] }] : []), ...c.sections.flatMap((s, i) => (s.kind === 'capacitor' ? [{ key: s.key, at: ['sections', i, 'key'] }] : []))];
    for (const cap of caps) {
      if (!cap.key) continue;
      if (keys.has(cap.key)) ctx.addIssue({ code: 'custom', path: cap.at, message: `The key '${cap.key}' is used twice.` });
      keys.add(cap.key);
    }
  });

export type SupplyCircuitBody = z.output<typeof supplyCircuitSchema>;
export type SupplyCircuitInput = z.input<typeof supplyCircuitSchema>;

export const analyzeSupplySchema = supplyCircuitSchema.and(
  z.object({
    options: z
      .object({
        stepsPerHalfCycle: z.number().int().min(32, 'At least 32 steps.').max(4096, 'At most 4096 steps.').optional(),
        derating: z.number().gt(0).max(1, 'A fraction up to 1.').optional(),
        waveformCycles: z.number().min(1).max(10).optional(),
      })
      .optional(),
  }),
);
export type AnalyzeSupplyBody = z.output<typeof analyzeSupplySchema>;
