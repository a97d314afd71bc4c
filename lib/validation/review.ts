import { z } from 'zod';
import { text } from './text';
import { idText } from './ids';

export const submitRevisionSchema = z.object({
  /** a note to the reviewers, sent with the notice */
  note: text().trim().max(2000, 'Keep the note under 2000 characters.').default(''),
});
export type SubmitRevisionInput = z.input<typeof submitRevisionSchema>;

export const DECISIONS = ['approve', 'request-changes'] as const;

export const decisionSchema = z
  .object({
    decision: z.enum(DECISIONS, { message: 'Choose approve or request changes.' }),
    comment: text().trim().max(5000, 'Keep the comment under 5000 characters.').default(''),
  })
  .superRefine((v, ctx) => {
    if (v.decision === 'request-changes' && v.comment.length === 0) {
      ctx.addIssue({ code: 'custom', path: ['comment'], message: 'Say what should change.' });
    }
  });
export type DecisionInput = z.input<typeof decisionSchema>;

export const REVISION_STATES = ['submitted', 'approved', 'changes-requested'] as const;

export const revisionListQuerySchema = z.object({
  state: z.enum(REVISION_STATES).optional(),
  projectId: idText().optional(),
});

/** GET /api/revisions/{id}?compare=N: the earlier revision number to compare with (the previous one by default). */
export const revisionViewQuerySchema = z.object({
  compare: idText('Revision number: a whole number such as 3.').optional(),
});
