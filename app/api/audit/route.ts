// GET /api/audit?projectId=&userId=&action= – the audit log, newest first
import { NextResponse } from 'next/server';
import { parseQuery, withUser } from '@/lib/api/with-user';
import { can } from '@/lib/auth/policy';
import { auditQuerySchema, listAudit } from '@/lib/audit/log';

// Admins read every event; designers and reviewers only the events of projects (which every role may read).
export const GET = withUser('audit:read', async (req, { user }) =>
  NextResponse.json({ events: await listAudit(parseQuery(req, auditQuerySchema), can(user.role, 'audit:read-all') ? 'all' : 'projects') }),
);
