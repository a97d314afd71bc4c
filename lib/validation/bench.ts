import { z } from 'zod';
import { text } from './text';
import { idText } from './ids';
import { quantity } from './quantity';

const optionalVolts = () =>
  z.preprocess((v) => (v === '' || v === undefined ? null : v), quantity('V', { min: 0 }).nullable()).optional();

/** A technician's bench readings: voltages to ground as read on the meter, optionally the plate current. */
export const benchCheckSchema = z
  .object({
    supplyVoltage: quantity('V', { positive: true }),
    plateVoltage: quantity('V', { min: 0 }),
    cathodeVoltage: quantity('V', { min: 0 }),
    screenVoltage: optionalVolts(),
    heaterVoltage: optionalVolts(),
    measuredCurrent: z.preprocess((v) => (v === '' || v === undefined ? null : v), quantity('A', { positive: true, max: 5 }).nullable()).optional(),
    tubeSerial: text().trim().max(80, 'Keep the serial or batch under 80 characters.').default(''),
    notes: text().trim().max(4000, 'Keep the notes under 4000 characters.').default(''),
  })
  .superRefine((v, ctx) => {
    if (v.plateVoltage > v.supplyVoltage * 1.02 + 1) ctx.addIssue({ code: 'custom', path: ['plateVoltage'], message: 'reads above the supply: check the meter range and the probe points' });
    if (typeof v.screenVoltage === 'number' && v.screenVoltage > v.supplyVoltage * 1.02 + 1) {
      ctx.addIssue({ code: 'custom', path: ['screenVoltage'], message: 'reads above the supply: check the probe points' });
    }
  });
export type BenchCheckInput = z.input<typeof benchCheckSchema>;
export type BenchCheckValues = z.output<typeof benchCheckSchema>;

export const BENCH_VERDICTS = ['pass', 'check', 'fail'] as const;

export const benchListQuerySchema = z.object({
  verdict: z.enum(BENCH_VERDICTS).optional(),
  /** "failing only": the checks whose verdict is fail */
  failing: z.enum(['1', 'true', '0', 'false']).optional().transform((v) => v === '1' || v === 'true'),
  stageId: idText().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(200),
});
export type BenchListQuery = z.output<typeof benchListQuerySchema>;

export const PHOTO_TYPES = ['image/jpeg', 'image/png', 'image/webp'] as const;
export const MAX_PHOTO_BYTES = 8 * 1024 * 1024;

export const photoParamSchema = z.object({ id: idText(), photoId: idText() });
