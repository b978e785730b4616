/**
 * Registered codes of a group: a binary, its input templates and the JSON Schema of its parameters,
 * per name and version. A definition is accepted only when its schema compiles and every template
 * compiles, so a broken one is refused at registration rather than at the first run.
 */
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import type { Code, CodeDefinition, CodeExport } from "../../shared/schemas/codes";
import { codeDefinitionSchema } from "../../shared/schemas/codes";
import { isReservedRunFileName } from "../../shared/schemas/run-folder";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database, DbExecutor } from "../db/client";
import { codeHosts, codes, hosts, recipes } from "../db/schema";
import { outputRuleProblems } from "../execution/output-rule-checks";
import { compileParameterSchema, ParameterSchemaError } from "../execution/parameters";
import { checkCodeTemplates } from "../execution/templates/render";
import { AppError, conflict, forbidden, notFound } from "../http/errors";
import { requireGroupRole, requireRoleFor } from "./access";

type CodeRow = typeof codes.$inferSelect;
type Problem = { path: string; message: string };

/** A stored code as the API shows it; `hostIds` are the hosts it is pinned to (code-hosts.service). */
export function toCode(row: CodeRow, hostIds: readonly string[] = []): Code {
  return {
    id: row.id,
    groupId: row.groupId,
    definition: codeDefinitionSchema.parse(row.definition),
    createdAt: row.createdAt.toISOString(),
    retiredAt: row.retiredAt ? row.retiredAt.toISOString() : null,
    hostIds: [...hostIds],
  };
}

/** The plain refusal for a retired code version, as recipe creation and run submission give it. */
export function retiredCodeMessage(name: string, version: string): string {
  return `${name} ${version} is retired; use a newer version or bring it back.`;
}

/** Templates read the run's target as `target`, so no parameter may take that name. */
function reservedParameterProblems(schema: Record<string, unknown>): Problem[] {
  const message =
    'Templates read the run\'s target as "target", so a parameter cannot have that name; rename it.';
  const problems: Problem[] = [];
  const properties = schema.properties;
  if (properties && typeof properties === "object" && Object.hasOwn(properties, "target")) {
    problems.push({ path: "parameters.properties.target", message });
  }
  if (Array.isArray(schema.required) && schema.required.includes("target")) {
    problems.push({ path: "parameters.required", message });
  }
  return problems;
}

/**
 * Everything wrong with a definition beyond its shape: schema, templates, clashing file names, names
 * Sigmaflow reserves for its own files. Checked here rather than in the contract, which also reads
 * stored definitions back: a definition stored before a name was reserved must stay readable.
 */
export function definitionProblems(definition: CodeDefinition): Problem[] {
  const problems: Problem[] = [];
  try {
    compileParameterSchema(definition.parameters);
  } catch (error) {
    if (!(error instanceof ParameterSchemaError)) throw error;
    problems.push({ path: "parameters", message: error.message });
  }
  problems.push(...reservedParameterProblems(definition.parameters));
  problems.push(...checkCodeTemplates(definition));
  problems.push(...outputRuleProblems(definition.outputRules));
  const reserved = (name: string) =>
    `${name} is a file Sigmaflow writes into run folders itself; give the file another name.`;
  definition.inputTemplates.forEach((input, index) => {
    if (isReservedRunFileName(input.fileName))
      problems.push({ path: `inputTemplates.${index}.fileName`, message: reserved(input.fileName) });
  });
  definition.outputFiles.forEach((name, index) => {
    if (isReservedRunFileName(name)) problems.push({ path: `outputFiles.${index}`, message: reserved(name) });
  });
  const seen = new Set<string>();
  definition.inputTemplates.forEach((input, index) => {
    if (seen.has(input.fileName)) {
      problems.push({
        path: `inputTemplates.${index}.fileName`,
        message: `Two input templates write ${input.fileName}; give each file one template.`,
      });
    }
    seen.add(input.fileName);
  });
  return problems;
}

function invalidDefinition(problems: Problem[]): AppError {
  const first = problems[0]!;
  return new AppError(
    422,
    "invalid_code_definition",
    `The code definition cannot be used: ${first.path}: ${first.message}`,
    problems,
  );
}

export async function listCodes(db: Database, principal: Principal, groupId: string): Promise<Code[]> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const rows = await db
    .select()
    .from(codes)
    .where(eq(codes.groupId, groupId))
    .orderBy(asc(codes.name), asc(codes.createdAt));
  const pinned = await codeHostIds(
    db,
    rows.map((row) => row.id),
  );
  return rows.map((row) => toCode(row, pinned.get(row.id)));
}

/** The hosts each of `codeIds` is pinned to, in host-name order; codes pinned nowhere are absent. */
export async function codeHostIds(
  db: DbExecutor,
  codeIds: readonly string[],
): Promise<Map<string, string[]>> {
  const pinned = new Map<string, string[]>();
  if (codeIds.length === 0) return pinned;
  const rows = await db
    .select({ codeId: codeHosts.codeId, hostId: codeHosts.hostId })
    .from(codeHosts)
    .innerJoin(hosts, eq(hosts.id, codeHosts.hostId))
    .where(inArray(codeHosts.codeId, [...codeIds]))
    .orderBy(asc(hosts.name));
  for (const row of rows) pinned.set(row.codeId, [...(pinned.get(row.codeId) ?? []), row.hostId]);
  return pinned;
}

export async function codeForCaller(db: Database, principal: Principal, codeId: string) {
  const [row] = await db.select().from(codes).where(eq(codes.id, codeId));
  if (!row) throw notFound("Code");
  const role = await requireRoleFor(db, principal, row.groupId, "collaborator", "Code");
  return { row, role };
}

export async function getCode(db: Database, principal: Principal, codeId: string): Promise<Code> {
  const { row } = await codeForCaller(db, principal, codeId);
  return toCode(row, (await codeHostIds(db, [row.id])).get(row.id));
}

export async function createCode(
  db: Database,
  principal: Principal,
  groupId: string,
  definition: CodeDefinition,
  ip: string | null,
): Promise<Code> {
  await requireGroupRole(db, principal, groupId, "member");
  const problems = definitionProblems(definition);
  if (problems.length > 0) throw invalidDefinition(problems);
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(codes)
      .values({
        groupId,
        name: definition.name,
        version: definition.version,
        definition,
        createdBy: principal.userId,
      })
      .onConflictDoNothing({ target: [codes.groupId, codes.name, codes.version] })
      .returning();
    if (!row) {
      throw conflict(
        `Version ${definition.version} of ${definition.name} is already registered in this group: give the new definition another version.`,
        [{ name: definition.name, version: definition.version }],
      );
    }
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "code.create",
      targetType: "code",
      targetId: row.id,
      details: { name: definition.name, version: definition.version },
      ip,
    });
    return toCode(row);
  });
}

/** As for recipes: the group's admins, or the member who registered the code, may delete it. */
export async function deleteCode(db: Database, principal: Principal, codeId: string, ip: string | null) {
  const { row: code, role } = await codeForCaller(db, principal, codeId);
  const isRegistrant = code.createdBy === principal.userId && role !== "collaborator";
  if (!principal.isSiteAdmin && role !== "admin" && !isRegistrant) {
    throw forbidden("Only the group's admins or the member who registered the code can delete it.");
  }
  await db.transaction(async (tx) => {
    // Recipe creation holds FOR SHARE on its codes, so no recipe can start using this one meanwhile.
    await tx.select({ id: codes.id }).from(codes).where(eq(codes.id, codeId)).for("update");
    const users = await tx
      .select({ name: recipes.name })
      .from(recipes)
      .where(
        and(
          eq(recipes.groupId, code.groupId),
          sql`${recipes.stages} @> ${JSON.stringify([{ codeId }])}::jsonb`,
        ),
      )
      .orderBy(asc(recipes.name));
    if (users.length > 0) {
      throw conflict(
        `Recipes use this code (${users.map((r) => r.name).join(", ")}); delete them first.`,
        users.map((r) => ({ recipe: r.name })),
      );
    }
    await tx.delete(codes).where(eq(codes.id, codeId));
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: code.groupId,
      action: "code.delete",
      targetType: "code",
      targetId: codeId,
      details: { name: code.name, version: code.version },
      ip,
    });
  });
}

/**
 * Retires a code version or brings it back. Like registering, any member of the group may do it (not
 * collaborators): it is reversible and removes nothing, and existing runs and recipes keep the version.
 */
export async function setCodeRetired(
  db: Database,
  principal: Principal,
  codeId: string,
  retired: boolean,
  ip: string | null,
): Promise<Code> {
  const { row: code, role } = await codeForCaller(db, principal, codeId);
  if (!principal.isSiteAdmin && role === "collaborator") {
    throw forbidden("Only the group's members and admins can retire a code or bring it back.");
  }
  return db.transaction(async (tx) => {
    // Recipe creation and run submission hold FOR SHARE on their codes, so retiring waits for them.
    const [current] = await tx.select().from(codes).where(eq(codes.id, codeId)).for("update");
    if (!current) throw notFound("Code");
    const pinned = (await codeHostIds(tx, [codeId])).get(codeId);
    if ((current.retiredAt !== null) === retired) return toCode(current, pinned);
    const [row] = await tx
      .update(codes)
      .set(
        retired
          ? { retiredAt: sql`now()`, retiredBy: principal.userId }
          : { retiredAt: null, retiredBy: null },
      )
      .where(eq(codes.id, codeId))
      .returning();
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: code.groupId,
      action: retired ? "code.retire" : "code.restore",
      targetType: "code",
      targetId: codeId,
      details: { name: code.name, version: code.version },
      ip,
    });
    return toCode(row!, pinned);
  });
}

export async function exportCodes(db: Database, principal: Principal, groupId: string): Promise<CodeExport> {
  const all = await listCodes(db, principal, groupId);
  return { format: "sigmaflow-code-definitions", version: 1, codes: all.map((code) => code.definition) };
}

const key = (d: { name: string; version: string }) => `${d.name}@${d.version}`;

/** Imports a document of definitions: all of them or, on any problem, none. */
export async function importCodes(
  db: Database,
  principal: Principal,
  groupId: string,
  document: CodeExport,
  ip: string | null,
): Promise<Code[]> {
  await requireGroupRole(db, principal, groupId, "member");
  const problems = document.codes.flatMap((definition, index) =>
    definitionProblems(definition).map((p) => ({ path: `codes.${index}.${p.path}`, message: p.message })),
  );
  if (problems.length > 0) throw invalidDefinition(problems);

  const counts = new Map<string, number>();
  for (const definition of document.codes)
    counts.set(key(definition), (counts.get(key(definition)) ?? 0) + 1);
  const repeated = document.codes.filter(
    (d, i, all) => counts.get(key(d))! > 1 && all.findIndex((o) => key(o) === key(d)) === i,
  );
  if (repeated.length > 0) {
    throw conflict(
      `The document lists the same name and version more than once: ${repeated.map(key).join(", ")}.`,
      repeated.map((d) => ({ name: d.name, version: d.version })),
    );
  }

  const clash = (list: { name: string; version: string }[]) =>
    conflict(
      `These versions are already registered in this group, so nothing was imported: ${list.map(key).join(", ")}.`,
      list.map((d) => ({ name: d.name, version: d.version })),
    );
  return db.transaction(async (tx) => {
    const names = [...new Set(document.codes.map((d) => d.name))];
    const existing = await tx
      .select({ name: codes.name, version: codes.version })
      .from(codes)
      .where(and(eq(codes.groupId, groupId), inArray(codes.name, names)));
    const taken = new Set(existing.map(key));
    const duplicates = document.codes.filter((d) => taken.has(key(d)));
    if (duplicates.length > 0) throw clash(duplicates);
    const rows = await tx
      .insert(codes)
      .values(
        document.codes.map((definition) => ({
          groupId,
          name: definition.name,
          version: definition.version,
          definition,
          createdBy: principal.userId,
        })),
      )
      .onConflictDoNothing({ target: [codes.groupId, codes.name, codes.version] })
      .returning();
    if (rows.length !== document.codes.length) {
      // Someone registered one of these versions between the check and the insert: roll back.
      const inserted = new Set(rows.map(key));
      throw clash(document.codes.filter((d) => !inserted.has(key(d))));
    }
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "code.import",
      targetType: "code",
      details: { codes: rows.map((row) => ({ id: row.id, name: row.name, version: row.version })) },
      ip,
    });
    const order = new Map(document.codes.map((d, i) => [key(d), i]));
    return rows.sort((a, b) => order.get(key(a))! - order.get(key(b))!).map((row) => toCode(row));
  });
}
