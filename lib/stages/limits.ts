// Bounds on a project's size, shared by the stage service, the report renderer and the screens.
/** Stages per project: a report of 64 stages draws within its time budget; the 65th stage is refused with a 422. */
export const MAX_STAGES_PER_PROJECT = 64;
