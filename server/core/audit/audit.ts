import type { Transaction } from 'sequelize';
import { AuditEvent } from '../models';

export interface AuditEntry {
  actorId: number | null;
  action: string;
  targetType: string;
  targetId?: string | number | null;
  detail?: Record<string, unknown>;
}

/** Records what happened, in the caller's transaction so the change and its trace land together. */
export async function recordAudit(entry: AuditEntry, transaction?: Transaction): Promise<void> {
  await AuditEvent.create(
    {
      actorId: entry.actorId,
      action: entry.action,
      targetType: entry.targetType,
      targetId: entry.targetId === undefined || entry.targetId === null ? null : String(entry.targetId),
      detail: entry.detail ?? {},
    },
    { transaction },
  );
}

/** Records many events in one statement (a bulk action's per-clip trail), in the caller's transaction. */
export async function recordAudits(entries: AuditEntry[], transaction: Transaction): Promise<void> {
  await AuditEvent.bulkCreate(
    entries.map((entry) => ({
      actorId: entry.actorId,
      action: entry.action,
      targetType: entry.targetType,
      targetId: entry.targetId === undefined || entry.targetId === null ? null : String(entry.targetId),
      detail: entry.detail ?? {},
    })),
    { transaction },
  );
}
