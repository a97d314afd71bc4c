// GET /api/invitations/{token} – public: is this invitation link still usable?
import { NextResponse } from 'next/server';
import { toErrorResponse } from '@/lib/api/errors';
import { findInvitation } from '@/lib/users/service';

export async function GET(_req: Request, ctx: { params: Promise<{ token: string }> }) {
  try {
    const { token } = await ctx.params;
    return NextResponse.json(await findInvitation(token));
  } catch (err) {
    return toErrorResponse(err);
  }
}
