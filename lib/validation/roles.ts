export const ROLE_VALUES = ['admin', 'designer', 'technician', 'reviewer'] as const;
export const ROLE_LABELS: Record<(typeof ROLE_VALUES)[number], string> = {
  admin: 'Admin',
  designer: 'Designer',
  technician: 'Technician',
  reviewer: 'Reviewer',
};
