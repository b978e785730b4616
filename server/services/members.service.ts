import { and, eq, sql } from "drizzle-orm";
import type { GroupRole } from "../../shared/schemas/groups";
import type { Member } from "../../shared/schemas/members";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database, DbExecutor } from "../db/client";
import { memberships, users } from "../db/schema";
import { conflict, notFound } from "../http/errors";
import { requireGroupRole } from "./access";

export async function listMembers(db: Database, principal: Principal, groupId: string): Promise<Member[]> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const rows = await db
    .select({
      userId: users.id,
      email: users.email,
      displayName: users.displayName,
      role: memberships.role,
      joinedAt: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.groupId, groupId))
    .orderBy(users.displayName);
  return rows.map((row) => ({ ...row, joinedAt: row.joinedAt.toISOString() }));
}

/**
 * Locks the group's membership rows and counts its admins, so two admins demoting each other at the
 * same moment cannot leave the group without one.
 */
async function lockedAdminCount(tx: DbExecutor, groupId: string): Promise<number> {
  const rows = await tx.execute<{ role: GroupRole }>(
    sql`select role from ${memberships} where group_id = ${groupId} for update`,
  );
  return rows.rows.filter((row) => row.role === "admin").length;
}

export async function changeMemberRole(
  db: Database,
  principal: Principal,
  groupId: string,
  userId: string,
  role: GroupRole,
  ip: string | null,
): Promise<Member> {
  await requireGroupRole(db, principal, groupId, "admin");
  return db.transaction(async (tx) => {
    const admins = await lockedAdminCount(tx, groupId);
    const [current] = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.groupId, groupId), eq(memberships.userId, userId)));
    if (!current) throw notFound("Member");
    if (current.role === "admin" && role !== "admin" && admins <= 1) {
      throw conflict("A group needs at least one admin: make someone else admin first.");
    }
    await tx
      .update(memberships)
      .set({ role })
      .where(and(eq(memberships.groupId, groupId), eq(memberships.userId, userId)));
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "member.role_change",
      targetType: "user",
      targetId: userId,
      details: { from: current.role, to: role },
      ip,
    });
    const [row] = await tx
      .select({
        userId: users.id,
        email: users.email,
        displayName: users.displayName,
        role: memberships.role,
        joinedAt: memberships.createdAt,
      })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.groupId, groupId), eq(memberships.userId, userId)));
    return { ...row!, joinedAt: row!.joinedAt.toISOString() };
  });
}

export async function removeMember(
  db: Database,
  principal: Principal,
  groupId: string,
  userId: string,
  ip: string | null,
): Promise<void> {
  await requireGroupRole(db, principal, groupId, "admin");
  await db.transaction(async (tx) => {
    const admins = await lockedAdminCount(tx, groupId);
    const [removed] = await tx
      .delete(memberships)
      .where(and(eq(memberships.groupId, groupId), eq(memberships.userId, userId)))
      .returning({ role: memberships.role });
    if (!removed) throw notFound("Member");
    if (removed.role === "admin" && admins <= 1) {
      throw conflict("A group needs at least one admin: make someone else admin before removing this one.");
    }
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "member.remove",
      targetType: "user",
      targetId: userId,
      details: { role: removed.role },
      ip,
    });
  });
}
