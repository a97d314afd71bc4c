// GET /api/admin/outbox – every queued, sent or failed mail with its attempts and attachment names
import { NextResponse } from 'next/server';
import { withUser } from '@/lib/api/with-user';
import { listOutbox } from '@/lib/mail/outbox-view';

export const GET = withUser('outbox:read', async () => NextResponse.json({ mails: await listOutbox() }));
