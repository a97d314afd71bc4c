import 'server-only';
// A project's amplifier with its global feedback loop: the stages in order, linked by the default couplings,
// the loop as entered on the output stage (what-if values from the request on top), solved by the chain engine.
import { ApiError } from '@/lib/api/errors';
import { chainInputSchema, type ChainInputRaw } from '@/lib/calc/chain/input';
import { defaultLinks } from '@/lib/calc/chain/network';
import { analyzeChain, type ChainAnalysis } from '@/lib/calc/chain/solve';
import type { FeedbackResult } from '@/lib/calc/feedback/analysis';
import type { StageFeedback } from '@/lib/calc/input';
import type { FeedbackQuery } from '@/lib/validation/feedback';
import { chainStagesFor, type ProjectDetail } from './service';

export type ProjectFeedback = {
  /** the loop as stored on the output stage and as analysed (with the what-if values) */
  stored: StageFeedback | null;
  used: { resistor: number; shuntResistor: number; capacitor: number | null };
  from: { id: string; name: string };
  to: { id: string; name: string };
  output: ChainAnalysis['output'];
  feedback: FeedbackResult;
  warnings: string[];
};

/** The project's own links when it has them (and they name its stages), else the default coupling in stage order. */
function linksFor(project: ProjectDetail, elements: Array<{ id: string; topology: string }>) {
  const own = (project as { chainLinks?: Array<{ from: string | number; to: string | number }> | null }).chainLinks;
  const ids = new Set(elements.map((e) => e.id));
  if (own && own.length && own.every((l) => ids.has(String(l.from)) && ids.has(String(l.to)))) return own;
  return defaultLinks(elements);
}

export async function projectFeedback(project: ProjectDetail, query: FeedbackQuery): Promise<ProjectFeedback | null> {
  const stages = (await chainStagesFor(project)).sort((a, b) => a.position - b.position);
  const outputStage = [...stages].reverse().find((s) => s.input && (s.input.topology === 'single-ended-output' || s.input.topology === 'push-pull-output') && s.input.feedback);
  if (!outputStage || !outputStage.input) return null;
  const broken = stages.find((s) => !s.input);
  if (broken) throw new ApiError('unprocessable_entity', `Stage '${broken.name}' cannot be analysed: ${broken.inputError?.message ?? 'its inputs are incomplete'}.`);
  const stored = (outputStage.input as { feedback?: StageFeedback }).feedback ?? null;
  if (!stored) return null;
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
    links: linksFor(project, elements),
    feedback: { from: String(outputStage.id), to: String(first.id), ...used, polarity: stored.polarity },
  } as unknown as ChainInputRaw;
  const parsed = chainInputSchema.safeParse(raw);
  if (!parsed.success) throw new ApiError('unprocessable_entity', parsed.error.issues[0]?.message ?? 'The chain cannot be built from these stages.');
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
