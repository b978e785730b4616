/**
 * Targets of a group: named molecules with versions and isotopologues. Members enter, change and derive
 * them, collaborators read them. Changing the atoms, charge, multiplicity or notes adds a version (runs
 * keep the version they used); a new name alone is a label and adds none. An isotopologue is a target of
 * its own whose parent is the target it was derived from; one derived from an isotopologue hangs under
 * the same root, so the list nests one level only.
 */
import { and, asc, eq, sql } from "drizzle-orm";
import type { z } from "zod";
import {
  type createIsotopologueRequestSchema,
  type createTargetRequestSchema,
  type TargetAtom,
  type TargetDetail,
  type TargetSummary,
  type TargetVersion,
  targetAtomSchema,
  targetDerivedSchema,
  type updateTargetRequestSchema,
} from "../../shared/schemas/targets";
import { getIsotope } from "../../shared/science/elements";
import { ScienceInputError } from "../../shared/science/errors";
import type { TargetInspection } from "../../shared/science/geometry";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database, DbExecutor } from "../db/client";
import { pgErrorCode } from "../db/pg-errors";
import { runs, targets, targetVersions, users } from "../db/schema";
import type { RunTarget } from "../execution/target-context";
import { AppError, conflict, forbidden, notFound } from "../http/errors";
import { requireGroupRole, requireRoleFor } from "./access";
import { atomsFromXyz, inspectVersion, storedAtoms } from "./target-geometry";

type CreateTarget = z.output<typeof createTargetRequestSchema>;
type UpdateTarget = z.output<typeof updateTargetRequestSchema>;
type CreateIsotopologue = z.output<typeof createIsotopologueRequestSchema>;
type TargetRow = typeof targets.$inferSelect;
type VersionRow = typeof targetVersions.$inferSelect;

const runCount = sql<number>`(select count(*) from ${runs} where ${runs.targetId} = ${targets.id})::int`;

/** Targets with the derived labels of their latest version and how many runs refer to them. */
function selectSummaries(db: DbExecutor) {
  return db
    .select({
      target: targets,
      formula: targetVersions.formula,
      pointGroup: targetVersions.pointGroup,
      abelianSubgroup: targetVersions.abelianSubgroup,
      runCount,
    })
    .from(targets)
    .innerJoin(
      targetVersions,
      and(eq(targetVersions.targetId, targets.id), eq(targetVersions.version, targets.latestVersion)),
    );
}

type SummaryRow = Awaited<ReturnType<ReturnType<typeof selectSummaries>["where"]>>[number];

function toSummary(row: SummaryRow): TargetSummary {
  const t = row.target;
  return {
    id: t.id,
    groupId: t.groupId,
    name: t.name,
    parentTargetId: t.parentTargetId,
    latestVersion: t.latestVersion,
    formula: row.formula,
    pointGroup: row.pointGroup,
    abelianSubgroup: row.abelianSubgroup,
    runCount: row.runCount,
    createdAt: t.createdAt.toISOString(),
    updatedAt: t.updatedAt.toISOString(),
  };
}

function toVersion(row: VersionRow, createdByName: string | null): TargetVersion {
  return {
    id: row.id,
    targetId: row.targetId,
    version: row.version,
    atoms: targetAtomSchema.array().parse(row.atoms),
    charge: row.charge,
    multiplicity: row.multiplicity,
    notes: row.notes,
    derived: targetDerivedSchema.parse(row.derived),
    createdAt: row.createdAt.toISOString(),
    createdByName,
  };
}

const byName = (a: TargetSummary, b: TargetSummary) => a.name.localeCompare(b.name);

export async function listTargets(db: Database, principal: Principal, groupId: string) {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const all = (await selectSummaries(db).where(eq(targets.groupId, groupId))).map(toSummary).sort(byName);
  return all
    .filter((target) => target.parentTargetId === null)
    .map((target) => ({
      ...target,
      isotopologues: all.filter((other) => other.parentTargetId === target.id),
    }));
}

async function targetForCaller(
  db: DbExecutor,
  principal: Principal,
  targetId: string,
  minimum: "collaborator" | "member",
) {
  const [row] = await db.select().from(targets).where(eq(targets.id, targetId));
  if (!row) throw notFound("Target");
  const role = await requireRoleFor(db, principal, row.groupId, minimum, "Target");
  return { row, role };
}

async function versionWithAuthor(db: DbExecutor, targetId: string, version: number) {
  const [found] = await db
    .select({ version: targetVersions, createdByName: users.displayName })
    .from(targetVersions)
    .leftJoin(users, eq(users.id, targetVersions.createdBy))
    .where(and(eq(targetVersions.targetId, targetId), eq(targetVersions.version, version)));
  return found ?? null;
}

export async function getTarget(db: Database, principal: Principal, targetId: string): Promise<TargetDetail> {
  await targetForCaller(db, principal, targetId, "collaborator");
  const [summary] = await selectSummaries(db).where(eq(targets.id, targetId));
  if (!summary) throw notFound("Target");
  const current = await versionWithAuthor(db, targetId, summary.target.latestVersion);
  const versions = await db
    .select({
      id: targetVersions.id,
      version: targetVersions.version,
      createdAt: targetVersions.createdAt,
      createdByName: users.displayName,
    })
    .from(targetVersions)
    .leftJoin(users, eq(users.id, targetVersions.createdBy))
    .where(eq(targetVersions.targetId, targetId))
    .orderBy(asc(targetVersions.version));
  const isotopologues = await selectSummaries(db).where(eq(targets.parentTargetId, targetId));
  return {
    ...toSummary(summary),
    current: toVersion(current!.version, current!.createdByName),
    versions: versions.map((v) => ({ ...v, createdAt: v.createdAt.toISOString() })),
    isotopologues: isotopologues.map(toSummary).sort(byName),
  };
}

export async function getTargetVersion(
  db: Database,
  principal: Principal,
  targetId: string,
  version: number,
): Promise<TargetVersion> {
  await targetForCaller(db, principal, targetId, "collaborator");
  const found = await versionWithAuthor(db, targetId, version);
  if (!found) throw notFound(`Version ${version} of the target`);
  return toVersion(found.version, found.createdByName);
}

const nameTaken = (name: string) =>
  conflict(`This group already has a target named "${name}"; choose another name.`, { path: "name" });

/** Runs `write`; a second target of the same name in the group (any case) becomes a 409. */
async function uniqueName<T>(name: string, write: () => Promise<T>): Promise<T> {
  try {
    return await write();
  } catch (error) {
    if (pgErrorCode(error) === "23505") throw nameTaken(name);
    throw error;
  }
}

function versionValues(
  targetId: string,
  version: number,
  atoms: TargetAtom[],
  inspection: TargetInspection,
  notes: string,
  createdBy: string,
) {
  return {
    targetId,
    version,
    atoms: storedAtoms(atoms, inspection),
    charge: inspection.chargeE,
    multiplicity: inspection.multiplicity,
    notes,
    derived: inspection,
    formula: inspection.formula,
    pointGroup: inspection.pointGroup,
    abelianSubgroup: inspection.abelianSubgroup,
    createdBy,
  };
}

async function insertTarget(
  tx: DbExecutor,
  values: { groupId: string; name: string; parentTargetId: string | null; createdBy: string },
  atoms: TargetAtom[],
  inspection: TargetInspection,
  notes: string,
): Promise<TargetRow> {
  const [row] = await tx
    .insert(targets)
    .values({ ...values, latestVersion: 1 })
    .returning();
  await tx
    .insert(targetVersions)
    .values(versionValues(row!.id, 1, atoms, inspection, notes, values.createdBy));
  return row!;
}

export async function createTarget(
  db: Database,
  principal: Principal,
  groupId: string,
  request: CreateTarget,
  ip: string | null,
): Promise<TargetDetail> {
  await requireGroupRole(db, principal, groupId, "member");
  const atoms = "xyz" in request ? atomsFromXyz(request.xyz) : request.atoms;
  const inspection = inspectVersion(atoms, request.charge ?? 0, request.multiplicity);
  const row = await uniqueName(request.name, () =>
    db.transaction(async (tx) => {
      const created = await insertTarget(
        tx,
        { groupId, name: request.name, parentTargetId: null, createdBy: principal.userId },
        atoms,
        inspection,
        request.notes ?? "",
      );
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId,
        action: "target.create",
        targetType: "target",
        targetId: created.id,
        details: { name: created.name, formula: inspection.formula, pointGroup: inspection.pointGroup },
        ip,
      });
      return created;
    }),
  );
  return getTarget(db, principal, row.id);
}

const CONTENT_FIELDS = ["atoms", "xyz", "charge", "multiplicity", "notes"] as const;

/**
 * Changes a target. Atoms, XYZ text, charge, multiplicity or notes make a new version from the current
 * one with what the request names replaced (a multiplicity of null: the lowest the electron count
 * allows); a new name alone renames the target without a version. Runs keep the version they used.
 */
export async function updateTarget(
  db: Database,
  principal: Principal,
  targetId: string,
  request: UpdateTarget,
  ip: string | null,
): Promise<TargetDetail> {
  const { row } = await targetForCaller(db, principal, targetId, "member");
  if (request.atoms !== undefined && request.xyz !== undefined) {
    throw new AppError(422, "validation_failed", "Send the atoms either as JSON or as XYZ text, not both.", [
      { path: "xyz", message: "Leave out either atoms or xyz." },
    ]);
  }
  const changesContent = CONTENT_FIELDS.some((field) => request[field] !== undefined);
  const renamed = request.name !== undefined && request.name !== row.name;
  if (!changesContent && !renamed) return getTarget(db, principal, targetId);
  const newAtoms = request.xyz !== undefined ? atomsFromXyz(request.xyz) : request.atoms;

  await uniqueName(request.name ?? row.name, () =>
    db.transaction(async (tx) => {
      // The row lock orders concurrent updates, so each gets its own version number.
      const [locked] = await tx.select().from(targets).where(eq(targets.id, targetId)).for("update");
      if (!locked) throw notFound("Target");
      if (changesContent) {
        const [current] = await tx
          .select()
          .from(targetVersions)
          .where(
            and(eq(targetVersions.targetId, targetId), eq(targetVersions.version, locked.latestVersion)),
          );
        const atoms = newAtoms ?? targetAtomSchema.array().parse(current!.atoms);
        const charge = request.charge ?? current!.charge;
        const multiplicity =
          request.multiplicity === null ? undefined : (request.multiplicity ?? current!.multiplicity);
        const inspection = inspectVersion(atoms, charge, multiplicity);
        const version = locked.latestVersion + 1;
        await tx
          .insert(targetVersions)
          .values(
            versionValues(
              targetId,
              version,
              atoms,
              inspection,
              request.notes ?? current!.notes,
              principal.userId,
            ),
          );
        await tx
          .update(targets)
          .set({ latestVersion: version, name: request.name ?? locked.name, updatedAt: new Date() })
          .where(eq(targets.id, targetId));
        await recordAudit(tx, {
          actorUserId: principal.userId,
          groupId: locked.groupId,
          action: "target.update",
          targetType: "target",
          targetId,
          details: { name: request.name ?? locked.name, version, formula: inspection.formula },
          ip,
        });
      } else {
        await tx
          .update(targets)
          .set({ name: request.name!, updatedAt: new Date() })
          .where(eq(targets.id, targetId));
      }
      if (request.name !== undefined && request.name !== locked.name) {
        await recordAudit(tx, {
          actorUserId: principal.userId,
          groupId: locked.groupId,
          action: "target.rename",
          targetType: "target",
          targetId,
          details: { name: request.name, from: locked.name },
          ip,
        });
      }
    }),
  );
  return getTarget(db, principal, targetId);
}

/**
 * An isotopologue: the current atoms of `targetId` with the chosen mass numbers, as a new target under
 * the root target (the parent's parent when `targetId` is itself an isotopologue), its properties derived
 * again (other masses: another centre of mass, other rotational constants, maybe a lower point group).
 */
export async function createIsotopologue(
  db: Database,
  principal: Principal,
  targetId: string,
  request: CreateIsotopologue,
  ip: string | null,
): Promise<TargetDetail> {
  const { row: source } = await targetForCaller(db, principal, targetId, "member");
  const [current] = await db
    .select()
    .from(targetVersions)
    .where(and(eq(targetVersions.targetId, targetId), eq(targetVersions.version, source.latestVersion)));
  const atoms = targetAtomSchema.array().parse(current!.atoms);
  const problems: { path: string; message: string }[] = [];
  const chosen = atoms.map((atom) => ({ ...atom }));
  request.isotopes.forEach((choice, index) => {
    const atom = chosen[choice.atom - 1];
    if (!atom) {
      problems.push({
        path: `isotopes.${index}.atom`,
        message: `${source.name} has atoms 1 to ${atoms.length}; there is no atom ${choice.atom}.`,
      });
      return;
    }
    try {
      getIsotope(atom.symbol, choice.massNumber);
      atom.massNumber = choice.massNumber;
    } catch (error) {
      if (!(error instanceof ScienceInputError)) throw error;
      problems.push({
        path: `isotopes.${index}.massNumber`,
        message: `Atom ${choice.atom}: ${error.message}`,
      });
    }
  });
  if (problems.length > 0) {
    throw new AppError(422, "validation_failed", `${problems[0]!.path}: ${problems[0]!.message}`, problems);
  }
  const inspection = inspectVersion(chosen, current!.charge, current!.multiplicity);
  const rootId = source.parentTargetId ?? source.id;
  const [root] = await db.select({ name: targets.name }).from(targets).where(eq(targets.id, rootId));
  const row = await uniqueName(request.name, () =>
    db.transaction(async (tx) => {
      // FOR SHARE: the root cannot be deleted while this isotopologue is being added under it.
      const [locked] = await tx
        .select({ id: targets.id })
        .from(targets)
        .where(eq(targets.id, rootId))
        .for("share");
      if (!locked) throw notFound("Target");
      const created = await insertTarget(
        tx,
        { groupId: source.groupId, name: request.name, parentTargetId: rootId, createdBy: principal.userId },
        chosen,
        inspection,
        request.notes,
      );
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: source.groupId,
        action: "target.isotopologue_create",
        targetType: "target",
        targetId: created.id,
        details: {
          name: created.name,
          parent: root!.name,
          parentTargetId: rootId,
          derivedFrom: { targetId: source.id, version: source.latestVersion },
          isotopes: request.isotopes,
          formula: inspection.formula,
          pointGroup: inspection.pointGroup,
        },
        ip,
      });
      return created;
    }),
  );
  return getTarget(db, principal, row.id);
}

const inUse = (what: string) => conflict(`Runs refer to this target (${what}), so it cannot be deleted.`);

/** As for codes and recipes: the group's admins, or the member who entered the target, may delete it. */
export async function deleteTarget(db: Database, principal: Principal, targetId: string, ip: string | null) {
  const { row, role } = await targetForCaller(db, principal, targetId, "member");
  const isAuthor = row.createdBy === principal.userId && role !== "collaborator";
  if (!principal.isSiteAdmin && role !== "admin" && !isAuthor) {
    throw forbidden("Only the group's admins or the member who entered the target can delete it.");
  }
  try {
    await db.transaction(async (tx) => {
      // FOR UPDATE waits for a run or an isotopologue being created against this target meanwhile.
      await tx.select({ id: targets.id }).from(targets).where(eq(targets.id, targetId)).for("update");
      const [used] = await tx
        .select({ count: sql<number>`count(*)::int` })
        .from(runs)
        .where(eq(runs.targetId, targetId));
      if (used!.count > 0) throw inUse(used!.count === 1 ? "1 run" : `${used!.count} runs`);
      const children = await tx
        .select({ name: targets.name })
        .from(targets)
        .where(eq(targets.parentTargetId, targetId))
        .orderBy(asc(targets.name));
      if (children.length > 0) {
        throw conflict(
          `The isotopologues ${children.map((c) => c.name).join(", ")} were derived from this target; delete them first.`,
          children.map((c) => ({ isotopologue: c.name })),
        );
      }
      await tx.delete(targets).where(eq(targets.id, targetId));
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: row.groupId,
        action: "target.delete",
        targetType: "target",
        targetId,
        details: { name: row.name },
        ip,
      });
    });
  } catch (error) {
    if (pgErrorCode(error) === "23503") throw inUse("created meanwhile");
    throw error;
  }
}

/**
 * The target a run names, at its latest version, as run creation uses it: only a target of the run's
 * group, otherwise a 422 on `spec.targetId`.
 */
export async function loadRunTarget(db: DbExecutor, groupId: string, targetId: string): Promise<RunTarget> {
  const [found] = await db
    .select({ target: { id: targets.id, name: targets.name }, version: targetVersions })
    .from(targets)
    .innerJoin(
      targetVersions,
      and(eq(targetVersions.targetId, targets.id), eq(targetVersions.version, targets.latestVersion)),
    )
    .where(and(eq(targets.id, targetId), eq(targets.groupId, groupId)));
  if (!found) {
    throw new AppError(422, "validation_failed", "The target does not exist in this group.", [
      { path: "spec.targetId", message: "Unknown target." },
    ]);
  }
  return found;
}
