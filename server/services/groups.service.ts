import { and, eq, sql } from "drizzle-orm";
import type { CreateGroupRequest, Group } from "../../shared/schemas/groups";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { groups, memberships } from "../db/schema";
import { conflict } from "../http/errors";
import { requireGroupRole, requireSiteAdmin } from "./access";

const memberCount = sql<number>`(select count(*)::int from ${memberships} m where m.group_id = ${groups.id})`;

function groupColumns(userId: string) {
  return {
    id: groups.id,
    slug: groups.slug,
    name: groups.name,
    description: groups.description,
    createdAt: groups.createdAt,
    memberCount,
    myRole: sql<
      Group["myRole"]
    >`(select m.role from ${memberships} m where m.group_id = ${groups.id} and m.user_id = ${userId})`,
  };
}

function toGroup(row: { createdAt: Date } & Omit<Group, "createdAt">): Group {
  return { ...row, createdAt: row.createdAt.toISOString() };
}

/** The groups the caller belongs to; a site admin sees every group. */
export async function listGroups(db: Database, principal: Principal): Promise<Group[]> {
  const base = db.select(groupColumns(principal.userId)).from(groups);
  const rows = principal.isSiteAdmin
    ? await base.orderBy(groups.name)
    : await base
        .innerJoin(
          memberships,
          and(eq(memberships.groupId, groups.id), eq(memberships.userId, principal.userId)),
        )
        .orderBy(groups.name);
  return rows.map(toGroup);
}

export async function getGroup(db: Database, principal: Principal, groupId: string): Promise<Group> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const [row] = await db.select(groupColumns(principal.userId)).from(groups).where(eq(groups.id, groupId));
  if (!row) throw new Error(`group ${groupId} vanished during the request`);
  return toGroup(row);
}

export async function createGroup(
  db: Database,
  principal: Principal,
  input: CreateGroupRequest & { description: string },
  ip: string | null,
): Promise<Group> {
  requireSiteAdmin(principal);
  return db.transaction(async (tx) => {
    const inserted = await tx
      .insert(groups)
      .values({
        slug: input.slug,
        name: input.name,
        description: input.description,
        createdBy: principal.userId,
      })
      .onConflictDoNothing({ target: groups.slug })
      .returning({ id: groups.id });
    const id = inserted[0]?.id;
    if (!id) throw conflict(`A group with the slug "${input.slug}" already exists.`, { path: "slug" });
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: id,
      action: "group.create",
      targetType: "group",
      targetId: id,
      details: { slug: input.slug, name: input.name },
      ip,
    });
    const [row] = await tx.select(groupColumns(principal.userId)).from(groups).where(eq(groups.id, id));
    return toGroup(row!);
  });
}
