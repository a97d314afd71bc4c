import { z } from 'zod';
import { quantity } from './quantity';

/**
 * GET /api/projects/{id}/feedback query: the chain input level (V rms, as in the chain view) and what-if values
 * for the loop that override the ones stored on the output stage (nothing is saved). `capacitor=none` removes
 * the step capacitor.
 */
export const feedbackQuerySchema = z.object({
  input: quantity('V', { positive: true, max: 100 }).default(0.1),
  resistor: quantity('Ω', { positive: true }).optional(),
  shuntResistor: quantity('Ω', { positive: true }).optional(),
  capacitor: z.union([z.literal('none'), quantity('F', { positive: true })]).optional(),
});
export type FeedbackQuery = z.output<typeof feedbackQuerySchema>;
