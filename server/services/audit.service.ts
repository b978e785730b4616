import { and, desc, eq, inArray } from "drizzle-orm";
import type { AuditEntry } from "../../shared/schemas/audit";
import type { AuditAction, AuditTargetType } from "../../shared/schemas/audit-actions";
import type { Principal } from "../auth/principal";
import type { DbExecutor } from "../db/client";
import {
  allocations,
  auditLog,
  codes,
  groups,
  hostAccounts,
  hosts,
  invitations,
  memberships,
  recipes,
  runs,
  users,
} from "../db/schema";
import { requireGroupRole } from "./access";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

type AuditRow = {
  id: number;
  at: Date;
  actor: string | null;
  action: AuditAction;
  targetType: AuditTargetType;
  targetId: string | null;
  details: Record<string, unknown>;
};

/** A target as it is now: its name, and whether the activity page may link to it. */
type CurrentTarget = { name: string; exists: boolean };
const key = (type: AuditTargetType, id: string) => `${type}:${id}`;

function text(details: Record<string, unknown>, field: string): string | null {
  const value = details[field];
  return typeof value === "string" && value !== "" ? value : null;
}

const codeName = (name: string, version: string | null) => (version ? `${name} ${version}` : name);

/** The name an entry recorded for its target (a deletion records the name it removed), or null. */
function recordedName(row: AuditRow, hostName: (hostId: string | null) => string | null): string | null {
  const { details } = row;
  switch (row.targetType) {
    case "code": {
      const imported = details.codes;
      if (Array.isArray(imported)) {
        const names = imported.flatMap((code: Record<string, unknown>) => {
          const name = text(code, "name");
          return name ? [codeName(name, text(code, "version"))] : [];
        });
        return names.length > 0 ? names.join(", ") : null;
      }
      const name = text(details, "name");
      return name ? codeName(name, text(details, "version")) : null;
    }
    case "invitation":
      return text(details, "email");
    case "host_account": {
      const username = text(details, "username");
      const host = hostName(text(details, "hostId"));
      return username && host ? `${username}@${host}` : username;
    }
    default:
      return text(details, "name");
  }
}

/**
 * The current names of the entries' targets, looked up per kind of target (one query for each kind that
 * occurs), and only among the group's own rows. A member counts as existing while still in the group.
 */
async function currentTargets(db: DbExecutor, groupId: string, rows: AuditRow[]) {
  const found = new Map<string, CurrentTarget>();
  const idsOf = (type: AuditTargetType, extra: (string | null)[] = []) => [
    ...new Set(
      [...rows.filter((row) => row.targetType === type).map((row) => row.targetId), ...extra].filter(
        (id): id is string => id !== null && UUID.test(id),
      ),
    ),
  ];
  const put = (type: AuditTargetType, list: { id: string; name: string; exists?: boolean }[]) => {
    for (const item of list) found.set(key(type, item.id), { name: item.name, exists: item.exists ?? true });
  };

  const accountHostIds = rows
    .filter((row) => row.targetType === "host_account")
    .map((row) => text(row.details, "hostId"));
  const hostIds = idsOf("host", accountHostIds);
  if (hostIds.length > 0) {
    put(
      "host",
      await db
        .select({ id: hosts.id, name: hosts.name })
        .from(hosts)
        .where(and(eq(hosts.groupId, groupId), inArray(hosts.id, hostIds))),
    );
  }
  const accountIds = idsOf("host_account");
  if (accountIds.length > 0) {
    const accounts = await db
      .select({ id: hostAccounts.id, username: hostAccounts.username, host: hosts.name })
      .from(hostAccounts)
      .innerJoin(hosts, eq(hosts.id, hostAccounts.hostId))
      .where(and(eq(hosts.groupId, groupId), inArray(hostAccounts.id, accountIds)));
    put(
      "host_account",
      accounts.map((account) => ({ id: account.id, name: `${account.username}@${account.host}` })),
    );
  }
  const codeIds = idsOf("code");
  if (codeIds.length > 0) {
    const rowsFound = await db
      .select({ id: codes.id, name: codes.name, version: codes.version })
      .from(codes)
      .where(and(eq(codes.groupId, groupId), inArray(codes.id, codeIds)));
    put(
      "code",
      rowsFound.map((code) => ({ id: code.id, name: codeName(code.name, code.version) })),
    );
  }
  const recipeIds = idsOf("recipe");
  if (recipeIds.length > 0) {
    put(
      "recipe",
      await db
        .select({ id: recipes.id, name: recipes.name })
        .from(recipes)
        .where(and(eq(recipes.groupId, groupId), inArray(recipes.id, recipeIds))),
    );
  }
  const allocationIds = idsOf("allocation");
  if (allocationIds.length > 0) {
    put(
      "allocation",
      await db
        .select({ id: allocations.id, name: allocations.name })
        .from(allocations)
        .where(and(eq(allocations.groupId, groupId), inArray(allocations.id, allocationIds))),
    );
  }
  const runIds = idsOf("run");
  if (runIds.length > 0) {
    put(
      "run",
      await db
        .select({ id: runs.id, name: runs.name })
        .from(runs)
        .where(and(eq(runs.groupId, groupId), inArray(runs.id, runIds))),
    );
  }
  const invitationIds = idsOf("invitation");
  if (invitationIds.length > 0) {
    put(
      "invitation",
      await db
        .select({ id: invitations.id, name: invitations.email })
        .from(invitations)
        .where(and(eq(invitations.groupId, groupId), inArray(invitations.id, invitationIds))),
    );
  }
  const userIds = idsOf("user");
  if (userIds.length > 0) {
    const people = await db
      .select({ id: users.id, name: users.displayName, member: memberships.userId })
      .from(users)
      .leftJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.groupId, groupId)))
      .where(inArray(users.id, userIds));
    put(
      "user",
      people.map((person) => ({ id: person.id, name: person.name, exists: person.member !== null })),
    );
  }
  if (idsOf("group").includes(groupId)) {
    put(
      "group",
      await db.select({ id: groups.id, name: groups.name }).from(groups).where(eq(groups.id, groupId)),
    );
  }
  return found;
}

/**
 * The group's audit log, newest first, with the actor's display name and each target's name, so the
 * activity page shows "Noor Vasquez confirmed the host key of kestrel-dev" rather than ids.
 */
export async function listGroupAudit(
  db: DbExecutor,
  principal: Principal,
  groupId: string,
  limit = 200,
): Promise<AuditEntry[]> {
  await requireGroupRole(db, principal, groupId, "admin");
  // The action and target columns hold only values recordAudit accepts, typed by the same list.
  const rows = (await db
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
    .limit(limit)) as AuditRow[];

  const current = await currentTargets(db, groupId, rows);
  // A name any entry recorded for a target that is gone (e.g. the deletion's), for all its entries.
  const recorded = new Map<string, string>();
  const hostName = (hostId: string | null) =>
    hostId === null
      ? null
      : (current.get(key("host", hostId))?.name ?? recorded.get(key("host", hostId)) ?? null);
  for (const type of ["host", "host_account", "code", "recipe", "allocation", "run", "invitation"] as const) {
    for (const row of rows) {
      if (row.targetType !== type || row.targetId === null) continue;
      const name = recordedName(row, hostName);
      if (name !== null && !recorded.has(key(type, row.targetId)))
        recorded.set(key(type, row.targetId), name);
    }
  }

  return rows.map((row) => {
    const target = row.targetId === null ? undefined : current.get(key(row.targetType, row.targetId));
    const targetName =
      target?.name ??
      (row.targetId === null ? null : recorded.get(key(row.targetType, row.targetId))) ??
      recordedName(row, hostName);
    return { ...row, at: row.at.toISOString(), targetName, targetExists: target?.exists ?? false };
  });
}
