import { getDb, type Db } from '../db/client';
import { auditLog } from '../db/schema';

export interface AuditEntry {
  workspaceId: number | null;
  userId: number | null;
  action: string;
  entityType?: string;
  entityId?: string | number;
  details?: Record<string, unknown>;
  ip?: string | null;
}

type Tx = Pick<Db, 'insert'>;

/** Append to the audit log; pass the transaction so the entry commits with the change. */
export async function audit(entry: AuditEntry, tx: Tx = getDb()): Promise<void> {
  await tx.insert(auditLog).values({
    workspaceId: entry.workspaceId,
    userId: entry.userId,
    action: entry.action,
    entityType: entry.entityType ?? null,
    entityId: entry.entityId == null ? null : String(entry.entityId),
    details: entry.details ?? null,
    ip: entry.ip ?? null,
    createdAt: new Date(),
  });
}
