/**
 * Group access rules, deny by default. A site admin may do anything in any group. Anyone else needs a
 * membership with at least the required role; a group they do not belong to does not exist for them
 * (404, so group ids cannot be probed).
 */
import { and, eq } from "drizzle-orm";
import { type GroupRole, groupRoleSchema } from "../../shared/schemas/groups";
import type { Principal } from "../auth/principal";
import type { DbExecutor } from "../db/client";
import { memberships } from "../db/schema";
import { AppError, forbidden, notFound } from "../http/errors";

/** The schema lists the roles from least to most access. */
const rank = (role: GroupRole): number => groupRoleSchema.options.indexOf(role);

export function roleAtLeast(role: GroupRole, minimum: GroupRole): boolean {
  return rank(role) >= rank(minimum);
}

export async function membershipRole(
  db: DbExecutor,
  userId: string,
  groupId: string,
): Promise<GroupRole | null> {
  const rows = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.userId, userId), eq(memberships.groupId, groupId)))
    .limit(1);
  return rows[0]?.role ?? null;
}

/** Returns the caller's role in the group (null for a site admin who is not a member) or throws 404/403. */
export async function requireGroupRole(
  db: DbExecutor,
  principal: Principal,
  groupId: string,
  minimum: GroupRole,
): Promise<GroupRole | null> {
  const role = await membershipRole(db, principal.userId, groupId);
  if (principal.isSiteAdmin) return role;
  if (!role) throw notFound("Group");
  if (!roleAtLeast(role, minimum)) {
    throw forbidden(
      minimum === "admin"
        ? "Only the group's admins can do this."
        : "Collaborators have read-only access to this group.",
    );
  }
  return role;
}

/**
 * Checks the caller's role in the group owning a row. A row of a group the caller does not belong to is
 * reported as missing under its own name, like the group itself.
 */
export async function requireRoleFor(
  db: DbExecutor,
  principal: Principal,
  groupId: string,
  minimum: GroupRole,
  what: string,
): Promise<GroupRole | null> {
  try {
    return await requireGroupRole(db, principal, groupId, minimum);
  } catch (error) {
    if (error instanceof AppError && error.status === 404) throw notFound(what);
    throw error;
  }
}

export function requireSiteAdmin(principal: Principal): void {
  if (!principal.isSiteAdmin) throw forbidden("Only site admins can do this.");
}
