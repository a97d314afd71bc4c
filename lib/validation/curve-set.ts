import { z } from 'zod';
import { text } from './text';

const optionalText = (max: number) =>
  text()
    .trim()
    .max(max)
    .optional()
    .transform((v) => (v === '' ? undefined : v));

/** Form fields sent alongside an uploaded curve CSV. */
export const curveUploadFieldsSchema = z.object({
  currentUnit: z.enum(['mA', 'A']),
  name: optionalText(120),
  notes: optionalText(2000),
  /** 'yes' stores currents whose size looks implausible for the type (after the warning was shown) */
  confirmMagnitude: z.enum(['yes']).optional(),
});
export type CurveUploadFields = z.infer<typeof curveUploadFieldsSchema>;

export const fitModelSchema = z.enum(['koren-triode', 'koren-pentode']);
export type FitModel = z.infer<typeof fitModelSchema>;

export const fitRequestSchema = z.object({ model: fitModelSchema });
export type FitRequest = z.infer<typeof fitRequestSchema>;

/** Accepting a fit turns it into a tube model; both fields are optional. */
export const acceptFitSchema = z.object({
  name: optionalText(120),
  setDefault: z.boolean().optional(),
});
export type AcceptFit = z.infer<typeof acceptFitSchema>;
