// POST /api/invitations/accept – public: set a password with a one-time invitation token
import { NextResponse, type NextRequest } from 'next/server';
import { toErrorResponse } from '@/lib/api/errors';
import { assertSameOrigin, parseBody } from '@/lib/api/with-user';
import { acceptInvitation } from '@/lib/users/service';
import { acceptInvitationSchema } from '@/lib/validation/auth';

export async function POST(req: NextRequest) {
  try {
    assertSameOrigin(req);
    const body = await parseBody(req, acceptInvitationSchema);
    return NextResponse.json(await acceptInvitation(body.token, body.password));
  } catch (err) {
    return toErrorResponse(err);
  }
}
