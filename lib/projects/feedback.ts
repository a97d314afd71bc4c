import 'server-only';
// A project's amplifier with its global feedback loop (the solve itself is pure: lib/calc/feedback/project-loop.ts).
import { projectLoop, type ProjectLoop } from '@/lib/calc/feedback/project-loop';
import type { FeedbackQuery } from '@/lib/validation/feedback';
import { chainStagesFor, type ProjectDetail } from './service';

export type ProjectFeedback = ProjectLoop;

export async function projectFeedback(project: ProjectDetail, query: FeedbackQuery): Promise<ProjectFeedback | null> {
  const stages = await chainStagesFor(project);
  return projectLoop(stages, (project as { chainLinks?: Array<{ from: string | number; to: string | number }> | null }).chainLinks, query);
}
