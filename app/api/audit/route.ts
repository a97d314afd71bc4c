// GET /api/audit?projectId=&userId=&action= – the audit log, newest first
import { NextResponse } from 'next/server';
import { parseQuery, withUser } from '@/lib/api/with-user';
import { auditQuerySchema, listAudit } from '@/lib/audit/log';

export const GET = withUser('audit:read', async (req) => NextResponse.json({ events: await listAudit(parseQuery(req, auditQuerySchema)) }));
