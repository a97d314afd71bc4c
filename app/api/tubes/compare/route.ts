// GET /api/tubes/compare?ids=1,2,3&vaMax= – default-model plate and transfer curves of two or three types on common axes
import { NextResponse } from 'next/server';
import { parseQuery, withUser } from '@/lib/api/with-user';
import { compareTubes } from '@/lib/tubes/service';
import { compareQuerySchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (req) => {
  const q = parseQuery(req, compareQuerySchema);
  return NextResponse.json(await compareTubes(q.ids, { vaMax: q.vaMax }));
});
