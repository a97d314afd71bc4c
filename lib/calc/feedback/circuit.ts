// The global feedback network as chain circuit elements (pure). Called by the chain builder after the stages and
// links are in place.
//
//   speaker ─ RBRK (1 mΩ, the loop's break point for the loop-gain analysis) ─ tap ─ Rf (∥ Cf) ─ fb
//   first stage: cathode ─ Rk ∥ Ck ─ fb ─ Rsh ─ ground        (Rsh: the unbypassed part under the bias network)
//   optional dominant pole: C from an earlier stage's output node to ground (across its plate load for signal)
//
// With the loop open (for the figures "without feedback") the tap is held at ground instead of the speaker, so
// the first stage keeps the loading of Rf and Rsh.
import { CalcError } from '../errors';
import type { Circuit } from '../chain/circuit';
import type { Ports } from '../chain/network';
import { z } from 'zod';
import { quantity } from '../../validation/quantity';

export const feedbackSchema = z.object({
  /** output stage the feedback is taken from (its speaker terminal) */
  from: z.union([z.string().trim().min(1).max(40), z.number().int()]).transform(String),
  /** earlier stage whose cathode circuit receives it */
  to: z.union([z.string().trim().min(1).max(40), z.number().int()]).transform(String),
  resistor: quantity('Ω', { positive: true }),
  /** unbypassed resistor at the bottom of the receiving stage's cathode circuit */
  shuntResistor: quantity('Ω', { positive: true }),
  /** step network: capacitor across the feedback resistor */
  capacitor: quantity('F', { positive: true }).nullable().default(null),
  /** dominant-pole correction: capacitor from an earlier stage's plate to signal ground */
  dominantPole: z
    .object({ stage: z.union([z.string().trim().min(1).max(40), z.number().int()]).transform(String), capacitance: quantity('F', { positive: true }) })
    .nullable()
    .default(null),
  /**
   * Which secondary terminal feeds the loop: 'normal' = in phase with the (first) output plate, 'reversed' = the
   * other one; 'auto' picks the one that gives negative feedback and says so.
   */
  polarity: z.enum(['auto', 'normal', 'reversed']).default('auto'),
});
export type FeedbackSpec = z.output<typeof feedbackSchema>;
export type FeedbackSpecRaw = z.input<typeof feedbackSchema>;

/** The spec as the builder takes it: `loop: 'open'` (internal, never from input) holds the tap at ground. */
export type FeedbackBuild = FeedbackSpec & { loop?: 'closed' | 'open' };

export const BREAK_RESISTANCE = 1e-3;
export const FEEDBACK_NODES = { tap: 'fb.tap', fb: 'fb.node' } as const;

export function applyFeedback(c: Circuit, ports: Ports[], spec: FeedbackBuild): { speaker: string; tap: string } {
  const from = ports.find((p) => p.id === spec.from);
  const to = ports.find((p) => p.id === spec.to);
  if (!from) throw new CalcError('invalid-input', `Feedback: there is no stage '${spec.from}' to take it from.`);
  if (!to) throw new CalcError('invalid-input', `Feedback: there is no stage '${spec.to}' to feed it to.`);
  const speaker = from.outputs.speaker;
  if (!speaker) {
    throw new CalcError(
      'invalid-input',
      `Feedback: stage '${spec.from}' has no speaker terminal. Feedback is taken from an output stage's secondary: enter its output transformer (at least the speaker load).`,
    );
  }
  if (ports.indexOf(to) >= ports.indexOf(from)) throw new CalcError('invalid-input', `Feedback: stage '${spec.to}' must come before '${spec.from}'.`);
  const rk = c.resistors.find((r) => r.name === `RK_${spec.to}`);
  if (!rk || (to.topology !== 'common-cathode' && to.topology !== 'pentode-amplifier')) {
    throw new CalcError(
      'invalid-input',
      `Feedback: stage '${spec.to}' needs a cathode-biased common-cathode or pentode stage; the feedback enters at the bottom of its cathode resistor.`,
    );
  }
  const fb = FEEDBACK_NODES.fb;
  const tap = FEEDBACK_NODES.tap;
  // the stage's own cathode resistor and bypass now return to the feedback node, above the shunt resistor
  rk.b = fb;
  const ck = c.capacitors.find((x) => x.name === `CK_${spec.to}`);
  if (ck) ck.b = fb;
  c.resistor('RSH_FB', fb, '0', spec.shuntResistor);
  c.resistor('RF_FB', tap, fb, spec.resistor);
  if (spec.capacitor) c.capacitor('CF_FB', tap, fb, spec.capacitor);
  // 'auto' is resolved before the build (analysis.ts); until then it is the normal connection
  if (spec.polarity === 'reversed') for (const t of c.transformers) if (t.name.endsWith(`_${spec.from}`)) t.ratio = -t.ratio;
  if (spec.loop !== 'open') c.resistor('RBRK_FB', speaker.node, tap, BREAK_RESISTANCE);
  else c.alias(tap, '0');
  if (spec.dominantPole) {
    const st = ports.find((p) => p.id === spec.dominantPole!.stage);
    if (!st) throw new CalcError('invalid-input', `Feedback: there is no stage '${spec.dominantPole.stage}' for the dominant-pole capacitor.`);
    const out = st.outputs.plate ?? st.outputs[st.main];
    c.capacitor('CDP_FB', out!.node, '0', spec.dominantPole.capacitance);
  }
  return { speaker: speaker.node, tap };
}
