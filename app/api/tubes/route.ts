// GET /api/tubes?search=&family=&page=&pageSize=&includeRetired= – the tube library, searched and paged; POST adds a type
import { NextResponse } from 'next/server';
import { parseBody, parseQuery, withUser } from '@/lib/api/with-user';
import { createTube, listTubes } from '@/lib/tubes/service';
import { createTubeSchema, tubeListQuerySchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (req) => NextResponse.json(await listTubes(parseQuery(req, tubeListQuerySchema))));

export const POST = withUser('tubes:write', async (req, { user }) => {
  const input = await parseBody(req, createTubeSchema);
  return NextResponse.json({ tube: await createTube(user, input) }, { status: 201 });
});
