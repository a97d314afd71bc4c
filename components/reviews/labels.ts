export const STATE_WORDS = { submitted: 'waiting for a decision', approved: 'approved', 'changes-requested': 'changes requested' } as const;
