/**
 * Where a code version is installed: the group's hosts it is pinned to. A version pinned to no host may
 * run on any of the group's hosts; a pinned one only on its hosts, so a run of a recipe goes only to a
 * host where every pinned stage code is installed.
 */
import { and, eq, inArray } from "drizzle-orm";
import type { Code } from "../../shared/schemas/codes";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database, DbExecutor } from "../db/client";
import { codeHosts, codes, hosts } from "../db/schema";
import { AppError, forbidden, notFound } from "../http/errors";
import { codeForCaller, codeHostIds, toCode } from "./codes.service";

/**
 * Sets the whole list of hosts a code version is installed on (empty: unpinned). Members and admins may,
 * as for retiring; every host must be one of the code's group. Recorded in the group's activity.
 */
export async function setCodeHosts(
  db: Database,
  principal: Principal,
  codeId: string,
  hostIds: readonly string[],
  ip: string | null,
): Promise<Code> {
  const { row: code, role } = await codeForCaller(db, principal, codeId);
  if (!principal.isSiteAdmin && role === "collaborator") {
    throw forbidden("Only the group's members and admins can say where a code is installed.");
  }
  return db.transaction(async (tx) => {
    const [current] = await tx.select().from(codes).where(eq(codes.id, codeId)).for("update");
    if (!current) throw notFound("Code");
    const known = hostIds.length
      ? await tx
          .select({ id: hosts.id, name: hosts.name })
          .from(hosts)
          .where(and(eq(hosts.groupId, code.groupId), inArray(hosts.id, [...hostIds])))
      : [];
    const unknown = hostIds.flatMap((id, n) =>
      known.some((host) => host.id === id)
        ? []
        : [{ path: `hostIds.${n}`, message: "No such host in the code's group." }],
    );
    if (unknown.length > 0) {
      throw new AppError(422, "validation_failed", "A listed host is not one of the group's hosts.", unknown);
    }
    const before = (await codeHostIds(tx, [codeId])).get(codeId) ?? [];
    await tx.delete(codeHosts).where(eq(codeHosts.codeId, codeId));
    if (hostIds.length > 0) {
      await tx
        .insert(codeHosts)
        .values(hostIds.map((hostId) => ({ codeId, hostId, createdBy: principal.userId })));
    }
    const after = (await codeHostIds(tx, [codeId])).get(codeId) ?? [];
    if (before.join() !== after.join()) {
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: code.groupId,
        action: "code.hosts",
        targetType: "code",
        targetId: codeId,
        details: {
          name: code.name,
          version: code.version,
          installedOn:
            after.length === 0
              ? "any of the group's hosts"
              : after.map((id) => known.find((host) => host.id === id)?.name ?? id).join(", "),
        },
        ip,
      });
    }
    return toCode(current, after);
  });
}

/**
 * Refuses a run on `host` when a stage's code is pinned to other hosts, naming the stage, the code and
 * where it is installed. Given inside the transaction that stores the run, after its codes are held.
 */
export async function requireStageCodesOn(
  db: DbExecutor,
  host: { id: string; name: string },
  stages: readonly { name: string; codeId: string; definition: { name: string; version: string } }[],
): Promise<void> {
  const pinned = await codeHostIds(
    db,
    stages.map((stage) => stage.codeId),
  );
  const elsewhere = stages.filter((stage) => {
    const on = pinned.get(stage.codeId);
    return on !== undefined && !on.includes(host.id);
  });
  if (elsewhere.length === 0) return;
  const hostNames = new Map(
    (
      await db
        .select({ id: hosts.id, name: hosts.name })
        .from(hosts)
        .where(inArray(hosts.id, [...new Set(elsewhere.flatMap((stage) => pinned.get(stage.codeId)!))]))
    ).map((row) => [row.id, row.name]),
  );
  const problems = elsewhere.map((stage) => {
    const on = pinned
      .get(stage.codeId)!
      .map((id) => hostNames.get(id) ?? id)
      .join(", ");
    return {
      path: "spec.hostId",
      message: `Stage ${stage.name}: ${stage.definition.name} ${stage.definition.version} is not installed on ${host.name}; it is on ${on}.`,
    };
  });
  throw new AppError(422, "code_not_on_host", problems[0]!.message, problems);
}
