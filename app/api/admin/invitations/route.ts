// POST /api/admin/invitations – invite a person by e-mail with a role (409 if the address has an account)
import { NextResponse } from 'next/server';
import { parseBody, withUser } from '@/lib/api/with-user';
import { inviteUser } from '@/lib/users/service';
import { inviteSchema } from '@/lib/validation/auth';

export const POST = withUser('users:manage', async (req, { user }) => {
  const input = await parseBody(req, inviteSchema);
  const invitation = await inviteUser(user.id, input);
  return NextResponse.json({ invitation: { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt } }, { status: 201 });
});
