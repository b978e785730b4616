/**
 * Writing the audit log: services record people's changes, the worker what it decides on its own
 * (holding runs, failing them). Reading the log for the API stays in the audit service.
 */
import type { AuditAction, AuditTargetOf } from "../../shared/schemas/audit-actions";
import type { DbExecutor } from "../db/client";
import { auditLog } from "../db/schema";

/** An entry to record; `action` is one of the listed actions, `targetType` the kind of target it is about. */
export type AuditRecord<A extends AuditAction = AuditAction> = {
  actorUserId: string | null;
  groupId?: string | null;
  action: A;
  targetType: AuditTargetOf<A>;
  targetId?: string | null;
  details?: Record<string, unknown>;
  ip?: string | null;
};

/** Appends to the audit log; call inside the transaction of the change it records. */
export async function recordAudit<A extends AuditAction>(
  db: DbExecutor,
  record: AuditRecord<A>,
): Promise<void> {
  await db.insert(auditLog).values({
    actorUserId: record.actorUserId,
    groupId: record.groupId ?? null,
    action: record.action,
    targetType: record.targetType,
    targetId: record.targetId ?? null,
    details: record.details ?? {},
    ip: record.ip ?? null,
  });
}
