import 'server-only';
// A project's amplifier with its global feedback loop (the solve itself is pure: lib/calc/feedback/project-loop.ts, run in the calc thread).
import type { ProjectLoop } from '@/lib/calc/feedback/project-loop';
import { runInCalcThread } from '@/lib/calc-worker/pool';
import type { FeedbackQuery } from '@/lib/validation/feedback';
import { chainStagesFor, type ProjectDetail } from './service';

export type ProjectFeedback = ProjectLoop;

export async function projectFeedback(project: ProjectDetail, query: FeedbackQuery): Promise<ProjectFeedback | null> {
  const stages = await chainStagesFor(project);
  // solved in the calc thread (lib/calc-worker): the loop re-solves the chain at many frequencies
  return runInCalcThread({ kind: 'feedback', stages, links: (project as { chainLinks?: Array<{ from: string | number; to: string | number }> | null }).chainLinks, options: query });
}
