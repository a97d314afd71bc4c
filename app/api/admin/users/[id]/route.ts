// PATCH /api/admin/users/{id} – change role, name, or deactivate/reactivate
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { updateUser } from '@/lib/users/service';
import { idParamSchema, updateUserSchema } from '@/lib/validation/auth';

export const PATCH = withUser('users:manage', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const patch = await parseBody(req, updateUserSchema);
  return NextResponse.json({ user: await updateUser(user.id, id, patch) });
});
