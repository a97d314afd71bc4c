// GET/POST /api/auth/* – next-auth (sign-in, sign-out, session, CSRF token)
import NextAuth from 'next-auth';
import { NextResponse, type NextRequest } from 'next/server';
import { authOptions } from '@/lib/auth/options';

const handler = NextAuth(authOptions);

// next-auth parses a JSON body itself and throws (500) on one that is not JSON: answer 400 in the one error shape.
async function POST(req: NextRequest, ctx: { params: Promise<{ nextauth: string[] }> }) {
  if ((req.headers.get('content-type') ?? '').includes('application/json')) {
    try {
      JSON.parse(await req.clone().text());
    } catch {
      return NextResponse.json({ error: { code: 'bad_request', message: 'The request body is not valid JSON.' } }, { status: 400 });
    }
  }
  return handler(req, ctx);
}

export { handler as GET, POST };
