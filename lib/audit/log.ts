import 'server-only';
import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { sequelize } from '@/lib/db';
import { idText } from '@/lib/validation/ids';
import { text } from '@/lib/validation/text';

export const auditQuerySchema = z.object({
  projectId: idText().optional(),
  userId: idText().optional(),
  action: text().max(60).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(200),
});

export type AuditRow = { id: number; createdAt: string; actor: string | null; actorId: number | null; action: string; targetType: string; targetId: string | null; projectId: number | null; project: string | null; details: Record<string, unknown> };

/**
 * 'all': every event (admins). 'projects': only events that belong to a project the caller can read; sign-ins,
 * invitations, role changes and other account events have no project and stay with the admins.
 */
export type AuditScope = 'all' | 'projects';

export async function listAudit(filter: z.infer<typeof auditQuerySchema>, scope: AuditScope = 'projects'): Promise<AuditRow[]> {
  const rows = await sequelize.query<{ id: number; created_at: Date; actor: string | null; actor_id: number | null; action: string; target_type: string; target_id: string | null; project_id: number | null; project: string | null; details: Record<string, unknown> }>(
    `SELECT a.id, a.created_at, u.display_name AS actor, a.actor_id, a.action, a.target_type, a.target_id, a.project_id, p.name AS project, a.details
       FROM audit_events a LEFT JOIN users u ON u.id = a.actor_id LEFT JOIN projects p ON p.id = a.project_id
      WHERE (:projectId::int IS NULL OR a.project_id = :projectId::int)
        AND (:userId::int IS NULL OR a.actor_id = :userId::int)
        AND (:action::text IS NULL OR a.action LIKE :action::text || '%')
        AND (:all OR (a.project_id IS NOT NULL AND p.id IS NOT NULL))
      ORDER BY a.id DESC LIMIT :limit`,
    { type: QueryTypes.SELECT, replacements: { projectId: filter.projectId ?? null, userId: filter.userId ?? null, action: filter.action || null, limit: filter.limit, all: scope === 'all' } },
  );
  return rows.map((r) => ({ id: r.id, createdAt: r.created_at.toISOString(), actor: r.actor, actorId: r.actor_id, action: r.action, targetType: r.target_type, targetId: r.target_id, projectId: r.project_id, project: r.project, details: r.details }));
}

export async function auditFilterOptions() {
  const [projects, users] = await Promise.all([
    sequelize.query<{ id: number; name: string }>('SELECT id, name FROM projects ORDER BY name', { type: QueryTypes.SELECT }),
    sequelize.query<{ id: number; name: string }>('SELECT id, display_name AS name FROM users ORDER BY display_name', { type: QueryTypes.SELECT }),
  ]);
  return { projects, users };
}
