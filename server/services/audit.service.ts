import { desc, eq } from "drizzle-orm";
import type { AuditEntry } from "../../shared/schemas/audit";
import type { Principal } from "../auth/principal";
import type { DbExecutor } from "../db/client";
import { auditLog, users } from "../db/schema";
import { requireGroupRole } from "./access";

export type AuditRecord = {
  actorUserId: string | null;
  groupId?: string | null;
  action: string;
  targetType: string;
  targetId?: string | null;
  details?: Record<string, unknown>;
  ip?: string | null;
};

/** Appends to the audit log; call inside the transaction of the change it records. */
export async function recordAudit(db: DbExecutor, record: AuditRecord): Promise<void> {
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

export async function listGroupAudit(
  db: DbExecutor,
  principal: Principal,
  groupId: string,
  limit = 200,
): Promise<AuditEntry[]> {
  await requireGroupRole(db, principal, groupId, "admin");
  const rows = await db
    .select({
      id: auditLog.id,
      at: auditLog.at,
      actor: users.displayName,
      action: auditLog.action,
      targetType: auditLog.targetType,
      targetId: auditLog.targetId,
      details: auditLog.details,
    })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorUserId))
    .where(eq(auditLog.groupId, groupId))
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(limit);
  return rows.map((row) => ({ ...row, at: row.at.toISOString() }));
}
