// Bounds on a project's size, shared by the stage service and the screens.
import { MAX_REPORT_STAGES } from '@/lib/report/limits';

/** Stages per project: every project must fit in one design report, so the 65th stage is refused with a 422. */
export const MAX_STAGES_PER_PROJECT = MAX_REPORT_STAGES;
