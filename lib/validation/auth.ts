import { z } from 'zod';
import { text } from './text';
import { idText } from './ids';
import { ROLE_VALUES } from './roles';

export const signInSchema = z.object({
  email: z.email('Enter a valid e-mail address.'),
  password: text().min(1, 'Enter your password.'),
});
export type SignInInput = z.infer<typeof signInSchema>;

export const inviteSchema = z.object({
  email: z.email('Enter a valid e-mail address.').transform((s) => s.toLowerCase()),
  displayName: text().trim().min(1, 'Enter a name.').max(120),
  role: z.enum(ROLE_VALUES, { message: 'Choose a role.' }),
});
export type InviteInput = z.input<typeof inviteSchema>;

export const acceptInvitationSchema = z
  .object({
    token: text().min(20, 'This link is incomplete.'),
    password: text().min(10, 'Use at least 10 characters.').max(200),
    confirm: text(),
  })
  .refine((v) => v.password === v.confirm, { path: ['confirm'], message: 'The two passwords differ.' });
export type AcceptInvitationInput = z.infer<typeof acceptInvitationSchema>;

export const updateUserSchema = z
  .object({
    role: z.enum(ROLE_VALUES).optional(),
    active: z.boolean().optional(),
    displayName: text().trim().min(1).max(120).optional(),
  })
  .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change.' });
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

export const idParamSchema = z.object({ id: idText() });
