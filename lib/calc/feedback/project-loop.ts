// A project's amplifier with its global feedback loop, from its stages (pure: the callers load the stages).
// The loop is entered on the output stage it is taken from and runs to the first stage; the stages are linked by
// the project's own chain links when it has them, else by the default couplings in stage order.
import { CalcError } from '../errors';
import { chainInputSchema, type ChainInputRaw } from '../chain/input';
import { defaultLinks } from '../chain/network';
import { analyzeChain, type ChainAnalysis } from '../chain/solve';
import type { StageFeedback, StageInput } from '../input';
import type { FeedbackResult } from './analysis';

export type LoopStage = { id: number; name: string; position: number; input: StageInput | null; inputError?: { message: string } | null };

export type LoopQuery = { input: number; resistor?: number; shuntResistor?: number; capacitor?: number | 'none' };

export type ProjectLoop = {
  /** the loop as stored on the output stage and as analysed (with the what-if values) */
  stored: StageFeedback;
  used: { resistor: number; shuntResistor: number; capacitor: number | null };
  from: { id: string; name: string };
  to: { id: string; name: string };
  output: ChainAnalysis['output'];
  feedback: FeedbackResult;
  warnings: string[];
};

function linksFor(own: Array<{ from: string | number; to: string | number }> | null | undefined, elements: Array<{ id: string; topology: string }>) {
  const ids = new Set(elements.map((e) => e.id));
  if (own && own.length && own.every((l) => ids.has(String(l.from)) && ids.has(String(l.to)))) return own;
  return defaultLinks(elements);
}

/** null when no output stage carries a loop. Throws CalcError when the stages cannot form the amplifier. */
export function projectLoop(stagesIn: LoopStage[], chainLinks: Array<{ from: string | number; to: string | number }> | null | undefined, query: LoopQuery): ProjectLoop | null {
  const stages = [...stagesIn].sort((a, b) => a.position - b.position);
  const outputStage = [...stages].reverse().find((s) => s.input && (s.input.topology === 'single-ended-output' || s.input.topology === 'push-pull-output') && s.input.feedback);
  if (!outputStage || !outputStage.input) return null;
  const stored = (outputStage.input as { feedback?: StageFeedback }).feedback;
  if (!stored) return null;
  const broken = stages.find((s) => !s.input);
  if (broken) throw new CalcError('invalid-input', `Stage '${broken.name}' cannot be analysed: ${broken.inputError?.message ?? 'its inputs are incomplete'}.`);
  const first = stages[0]!;
  const used = {
    resistor: query.resistor ?? stored.resistor,
    shuntResistor: query.shuntResistor ?? stored.shuntResistor,
    capacitor: query.capacitor === 'none' ? null : (query.capacitor ?? stored.capacitor),
  };
  const elements = stages.map((s) => ({ id: String(s.id), ...s.input! }));
  const raw = {
    input: { amplitude: query.input * Math.SQRT2, frequency: 1000 },
    stages: elements,
    links: linksFor(chainLinks, elements),
    feedback: { from: String(outputStage.id), to: String(first.id), ...used, polarity: stored.polarity },
  } as unknown as ChainInputRaw;
  const parsed = chainInputSchema.safeParse(raw);
  if (!parsed.success) throw new CalcError('invalid-input', parsed.error.issues[0]?.message ?? 'The chain cannot be built from these stages.');
  const result = analyzeChain(parsed.data, { sweep: false });
  return {
    stored,
    used,
    from: { id: String(outputStage.id), name: outputStage.name },
    to: { id: String(first.id), name: first.name },
    output: result.output,
    feedback: result.feedback!,
    warnings: result.warnings,
  };
}
