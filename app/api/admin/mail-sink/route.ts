// GET /api/admin/mail-sink – what the local SMTP sink received (development and tests)
import { NextResponse } from 'next/server';
import { withUser } from '@/lib/api/with-user';
import { listSinkMessages } from '@/lib/mail/outbox-view';

export const GET = withUser('outbox:read', async () => NextResponse.json({ messages: (await listSinkMessages()) ?? [] }));
