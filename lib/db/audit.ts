import 'server-only';
import type { Transaction } from 'sequelize';
import { AuditEvent } from '@/models';
import './index';

export type AuditEntry = {
  actorId: number | null;
  action: string;
  targetType: string;
  targetId: number | string | null;
  projectId?: number | null;
  details?: Record<string, unknown>;
};

// Call inside the same transaction as the change it records, so neither exists without the other.
export async function recordAudit(transaction: Transaction | null, entry: AuditEntry) {
  await AuditEvent.create(
    {
      actorId: entry.actorId,
      action: entry.action,
      targetType: entry.targetType,
      targetId: entry.targetId === null ? null : String(entry.targetId),
      projectId: entry.projectId ?? null,
      details: entry.details ?? {},
    },
    { transaction: transaction ?? undefined },
  );
}
