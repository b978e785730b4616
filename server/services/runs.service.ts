/**
 * Runs: creation (validation, plan, fingerprint, reservation and enqueueing in one transaction), reading,
 * cancelling, resubmitting and reusing results. The worker carries a run forward from `queued`.
 */
import { randomBytes } from "node:crypto";
import { and, desc, eq, gt, inArray, isNull } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type pg from "pg";
import type PgBoss from "pg-boss";
import type { CodeDefinition } from "../../shared/schemas/codes";
import { codeDefinitionSchema } from "../../shared/schemas/codes";
import {
  FINAL_RUN_STATES,
  type OnDuplicate,
  type ResubmitRunRequest,
  type RunDetail,
  type RunProgress,
  type RunSpec,
  type RunSpecRequest,
  type RunState,
  type RunSummary,
  runSpecSchema,
  runStageProgressSchema,
} from "../../shared/schemas/runs";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { withClientTransaction } from "../db/client-transaction";
import {
  codes,
  hosts,
  ledgerEntries,
  recipes,
  runArtifacts,
  runEvents,
  runLogChunks,
  runs,
  runTimings,
  users,
} from "../db/schema";
import { validateParameters } from "../execution/parameters";
import { buildRunPlan, type RunPlan, runFingerprint, type StageInput } from "../execution/run-plan";
import { applySpecChanges, resolveResources } from "../execution/run-spec";
import { transitionRun } from "../execution/run-transitions";
import { AppError, conflict, forbidden, notFound } from "../http/errors";
import { RUN_STEP_QUEUES } from "../queue/queues";
import { requireGroupRole } from "./access";
import { activeAllocation, reserveAgainstAllocation } from "./allocations.service";
import { chooseAccount } from "./host-accounts.service";

export type RunDeps = { db: Database; pool: pg.Pool; boss: PgBoss };

const SECONDS_PER_HOUR = 3600;
const hours = (coreSeconds: number) => Math.round((coreSeconds / SECONDS_PER_HOUR) * 1e4) / 1e4;

/** Remote folder of a run below the host's base folder; only names we generate. */
export const RUN_DIR_PREFIX = "sf-run-";
export const remoteRunDir = (baseDir: string, runId: string) => `${baseDir}/${RUN_DIR_PREFIX}${runId}`;

async function loadStages(
  db: Database,
  groupId: string,
  spec: Pick<RunSpecRequest, "recipeId" | "parameters">,
): Promise<StageInput[]> {
  const [recipe] = await db
    .select()
    .from(recipes)
    .where(and(eq(recipes.id, spec.recipeId), eq(recipes.groupId, groupId)));
  if (!recipe)
    throw new AppError(422, "validation_failed", "The recipe does not exist in this group.", [
      { path: "spec.recipeId", message: "Unknown recipe." },
    ]);
  const stages = recipe.stages as { name: string; codeId: string }[];
  const codeRows = await db
    .select()
    .from(codes)
    .where(
      and(
        eq(codes.groupId, groupId),
        inArray(
          codes.id,
          stages.map((s) => s.codeId),
        ),
      ),
    );
  const byId = new Map(
    codeRows.map((row) => [row.id, codeDefinitionSchema.parse(row.definition) as CodeDefinition]),
  );
  const unknownStages = Object.keys(spec.parameters).filter((name) => !stages.some((s) => s.name === name));
  if (unknownStages.length > 0) {
    throw new AppError(
      422,
      "validation_failed",
      `The recipe has no stage named ${unknownStages.join(", ")}.`,
      unknownStages.map((name) => ({
        path: `spec.parameters.${name}`,
        message: "No such stage in the recipe.",
      })),
    );
  }
  const problems: { path: string; message: string }[] = [];
  const inputs = stages.map((stage) => {
    const definition = byId.get(stage.codeId);
    if (!definition)
      throw new AppError(422, "validation_failed", `The code of stage ${stage.name} was deleted.`);
    const check = validateParameters(definition, spec.parameters[stage.name] ?? {});
    if (!check.valid) {
      for (const issue of check.errors) {
        problems.push({
          path: `spec.parameters.${stage.name}${issue.path ? `.${issue.path}` : ""}`,
          message: issue.message,
        });
      }
      return { name: stage.name, codeId: stage.codeId, definition, parameters: {} };
    }
    // Defaults from the schema are filled in, so equal runs get equal fingerprints however they are written.
    return { name: stage.name, codeId: stage.codeId, definition, parameters: check.parameters };
  });
  if (problems.length > 0) {
    throw new AppError(
      422,
      "validation_failed",
      `The parameters do not fit the codes' declarations: ${problems[0]!.path}: ${problems[0]!.message}`,
      problems,
    );
  }
  return inputs;
}

async function loadHost(db: Database, groupId: string, hostId: string) {
  const [host] = await db
    .select()
    .from(hosts)
    .where(and(eq(hosts.id, hostId), eq(hosts.groupId, groupId)));
  if (!host)
    throw new AppError(422, "validation_failed", "The host does not exist in this group.", [
      { path: "spec.hostId", message: "Unknown host." },
    ]);
  if (!host.hostKeyConfirmedAt || !host.hostKey) {
    throw new AppError(
      422,
      "host_not_confirmed",
      `An admin must confirm the host key of ${host.name} before runs can use it.`,
    );
  }
  if (host.status === "key_mismatch") {
    throw new AppError(
      422,
      "host_key_mismatch",
      `${host.name} presented a different host key; an admin must check it before runs can use it.`,
    );
  }
  return host;
}

/** The latest finished run with these inputs that really ran (a reusing run holds no results of its own). */
async function findReusable(db: Database, groupId: string, fingerprint: string) {
  const [row] = await db
    .select({ id: runs.id, name: runs.name, finishedAt: runs.finishedAt })
    .from(runs)
    .where(
      and(
        eq(runs.groupId, groupId),
        eq(runs.fingerprint, fingerprint),
        eq(runs.state, "done"),
        isNull(runs.reusedFrom),
      ),
    )
    .orderBy(desc(runs.finishedAt))
    .limit(1);
  return row ?? null;
}

export async function createRun(
  deps: RunDeps,
  principal: Principal,
  groupId: string,
  request: { spec: RunSpecRequest; onDuplicate: OnDuplicate },
  extra: { resubmittedFrom?: string; ip?: string | null } = {},
): Promise<RunSummary> {
  const { db } = deps;
  await requireGroupRole(db, principal, groupId, "member");
  const host = await loadHost(db, groupId, request.spec.hostId);
  const account = await chooseAccount(db, host.id, principal.userId);
  if (!account) {
    throw new AppError(
      422,
      "no_host_account",
      `You have no account on ${host.name} and the group has none: add one under the host's accounts.`,
    );
  }
  const inputs = await loadStages(db, groupId, request.spec);
  // Stored with the resources it got, so a resubmission starts from exactly what this run asked for.
  const spec: RunSpec = {
    ...request.spec,
    resources: resolveResources(
      request.spec.resources,
      inputs.map((input) => input.definition),
    ),
  };
  const runId = crypto.randomUUID();
  let plan: ReturnType<typeof buildRunPlan>;
  try {
    plan = buildRunPlan(runId, spec.name, inputs);
  } catch (error) {
    throw new AppError(422, "template_failed", (error as Error).message);
  }
  const fingerprint = runFingerprint(inputs, plan);
  const reusable = await findReusable(db, groupId, fingerprint);
  if (reusable && request.onDuplicate === "ask") {
    throw conflict(
      `A finished run with identical inputs exists: "${reusable.name}" (run ${reusable.id}). ` +
        `Send again with onDuplicate "reuse" to take its results without running, or "run" to run anyway.`,
      {
        reason: "reusable_result",
        runId: reusable.id,
        runName: reusable.name,
        onDuplicate: ["reuse", "run"],
      },
    );
  }
  const reuse = reusable && request.onDuplicate === "reuse" ? reusable : null;
  const reserveCoreSeconds = reuse ? 0 : spec.resources.cores * spec.resources.wallTimeMinutes * 60;

  await withClientTransaction(deps.pool, async ({ db: tx, executeSql }) => {
    const allocation = await activeAllocation(tx, groupId, new Date());
    if (!allocation)
      throw new AppError(
        422,
        "no_allocation",
        "Your group has no allocation for the current period: ask a group admin.",
      );
    await tx.insert(runs).values({
      id: runId,
      groupId,
      recipeId: spec.recipeId,
      hostId: host.id,
      hostAccountId: account.id,
      allocationId: allocation.id,
      submittedBy: principal.userId,
      name: spec.name,
      spec,
      plan,
      fingerprint,
      state: reuse ? "done" : "queued",
      stateMessage: reuse ? `Results reused from run ${reuse.id}.` : null,
      cores: spec.resources.cores,
      wallTimeMinutes: spec.resources.wallTimeMinutes,
      reservedCoreSeconds: reserveCoreSeconds,
      chargedCoreSeconds: reuse ? 0 : null,
      remoteDir: remoteRunDir(host.remoteBaseDir, runId),
      submitToken: `sf-${runId.slice(0, 8)}-${randomBytes(4).toString("hex")}`,
      resubmittedFrom: extra.resubmittedFrom ?? null,
      reusedFrom: reuse?.id ?? null,
      notifyByEmail: spec.notifyByEmail,
      finishedAt: reuse ? new Date() : null,
    });
    await tx.insert(runEvents).values({
      runId,
      toState: reuse ? "done" : "queued",
      actor: "user",
      actorUserId: principal.userId,
      message: reuse ? `Reused the results of run ${reuse.id}` : "Submitted",
    });
    if (!reuse)
      await deps.boss.send(RUN_STEP_QUEUES.stage, { runId }, { db: { executeSql: executeSql as never } });
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: reuse ? "run.reuse" : "run.create",
      targetType: "run",
      targetId: runId,
      details: {
        name: spec.name,
        fingerprint,
        reserveCoreSeconds,
        resubmittedFrom: extra.resubmittedFrom ?? null,
      },
      ip: extra.ip ?? null,
    });
    if (reuse) return;
    // Last, so the allocation stays locked only for the check, the reservation and the commit.
    const { reserved, availableCoreSeconds: available } = await reserveAgainstAllocation(
      tx,
      allocation.id,
      runId,
      reserveCoreSeconds,
    );
    if (!reserved) {
      throw new AppError(
        422,
        "allocation_exceeded",
        `This run needs ${hours(reserveCoreSeconds)} core-hours (cores × wall-time limit) but ${allocation.name} has ${hours(Math.max(available, 0))} left.`,
        { neededCoreHours: hours(reserveCoreSeconds), availableCoreHours: hours(Math.max(available, 0)) },
      );
    }
  });
  return (await getRunSummary(db, runId))!;
}

const canceller = alias(users, "canceller");
const summaryColumns = {
  run: runs,
  submittedBy: users.displayName,
  cancelRequestedBy: canceller.displayName,
};

/** Runs with the names of who submitted them and who asked to cancel them. */
function selectSummaries(db: Database) {
  return db
    .select(summaryColumns)
    .from(runs)
    .leftJoin(users, eq(users.id, runs.submittedBy))
    .leftJoin(canceller, eq(canceller.id, runs.cancelRequestedBy));
}

/** The stored progress with the stage's place in the run's plan. */
function progressOf(run: typeof runs.$inferSelect): RunProgress | null {
  const stored = runStageProgressSchema.safeParse(run.progress);
  if (!stored.success) return null;
  const stages = (run.plan as RunPlan).stages;
  const index = stages.findIndex((stage) => stage.name === stored.data.stage);
  if (index < 0) return null;
  return { ...stored.data, stageIndex: index + 1, stageCount: stages.length };
}

function toSummary(row: {
  run: typeof runs.$inferSelect;
  submittedBy: string | null;
  cancelRequestedBy: string | null;
}): RunSummary {
  const r = row.run;
  return {
    id: r.id,
    groupId: r.groupId,
    name: r.name,
    recipeId: r.recipeId,
    hostId: r.hostId,
    state: r.state,
    stateMessage: r.stateMessage,
    fingerprint: r.fingerprint,
    cores: r.cores,
    wallTimeMinutes: r.wallTimeMinutes,
    reservedCoreHours: hours(r.reservedCoreSeconds),
    chargedCoreHours: r.chargedCoreSeconds === null ? null : hours(r.chargedCoreSeconds),
    schedulerJobId: r.schedulerJobId,
    exitCode: r.exitCode,
    resubmittedFrom: r.resubmittedFrom,
    reusedFrom: r.reusedFrom,
    submittedBy: row.submittedBy,
    cancelRequested: r.cancelRequestedAt !== null,
    cancelRequestedBy: r.cancelRequestedAt === null ? null : row.cancelRequestedBy,
    progress: progressOf(r),
    createdAt: r.createdAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
  };
}

async function getRunSummary(db: Database, runId: string): Promise<RunSummary | null> {
  const [row] = await selectSummaries(db).where(eq(runs.id, runId));
  return row ? toSummary(row) : null;
}

/** Loads a run the caller may see (any role in its group), or 404. */
async function visibleRun(
  db: Database,
  principal: Principal,
  runId: string,
  minimum: "collaborator" | "member",
) {
  const [run] = await db.select().from(runs).where(eq(runs.id, runId));
  if (!run) throw notFound("Run");
  await requireGroupRole(db, principal, run.groupId, minimum).catch((error: unknown) => {
    if (error instanceof AppError && error.status === 404) throw notFound("Run");
    throw error;
  });
  return run;
}

export async function listRuns(
  db: Database,
  principal: Principal,
  groupId: string,
  filters: { state?: RunState; limit: number },
): Promise<RunSummary[]> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const where = filters.state
    ? and(eq(runs.groupId, groupId), eq(runs.state, filters.state))
    : eq(runs.groupId, groupId);
  const rows = await selectSummaries(db).where(where).orderBy(desc(runs.createdAt)).limit(filters.limit);
  return rows.map(toSummary);
}

export async function getRunDetail(db: Database, principal: Principal, runId: string): Promise<RunDetail> {
  const run = await visibleRun(db, principal, runId, "collaborator");
  const artifactRunId = run.reusedFrom ?? run.id;
  const [summary, events, artifacts, timings] = await Promise.all([
    getRunSummary(db, runId),
    db
      .select({ event: runEvents, actorName: users.displayName })
      .from(runEvents)
      .leftJoin(users, eq(users.id, runEvents.actorUserId))
      .where(eq(runEvents.runId, runId))
      .orderBy(runEvents.id),
    db
      .select({
        id: runArtifacts.id,
        stage: runArtifacts.stage,
        name: runArtifacts.name,
        sizeBytes: runArtifacts.sizeBytes,
        sha256: runArtifacts.sha256,
      })
      .from(runArtifacts)
      .where(eq(runArtifacts.runId, artifactRunId))
      .orderBy(runArtifacts.stage, runArtifacts.name),
    db
      .select()
      .from(runTimings)
      .where(eq(runTimings.runId, artifactRunId))
      .orderBy(runTimings.stage, runTimings.symmetry),
  ]);
  // Timings in the order the stages run, not alphabetically by stage name.
  const stageOrder = (run.plan as RunPlan).stages.map((stage) => stage.name);
  const byStage = (stage: string) => {
    const index = stageOrder.indexOf(stage);
    return index < 0 ? stageOrder.length : index;
  };
  return {
    ...summary!,
    spec: runSpecSchema.parse(run.spec),
    events: events.map(({ event: e, actorName }) => ({
      at: e.at.toISOString(),
      fromState: e.fromState,
      toState: e.toState,
      actor: e.actor,
      actorName,
      message: e.message,
    })),
    artifacts,
    timings: timings
      .map((t) => ({ stage: t.stage, symmetry: t.symmetry, seconds: t.elapsedMs / 1000 }))
      .sort((a, b) => byStage(a.stage) - byStage(b.stage)),
  };
}

export async function readArtifact(db: Database, principal: Principal, runId: string, artifactId: string) {
  const run = await visibleRun(db, principal, runId, "collaborator");
  const [artifact] = await db
    .select()
    .from(runArtifacts)
    .where(and(eq(runArtifacts.id, artifactId), eq(runArtifacts.runId, run.reusedFrom ?? run.id)));
  if (!artifact) throw notFound("Artefact");
  return artifact;
}

/** States in which no scheduler job can exist yet (a held run counts by the state it was held in). */
const BEFORE_SCHEDULER: RunState[] = ["queued", "staging"];

/**
 * Cancels a run. Before it reaches the scheduler it is cancelled at once and its reservation released;
 * afterwards the scheduler is asked to cancel and the run becomes `cancelled` when the scheduler confirms.
 */
export async function cancelRun(
  deps: RunDeps,
  principal: Principal,
  runId: string,
  ip: string | null,
): Promise<RunSummary> {
  const { db } = deps;
  const run = await visibleRun(db, principal, runId, "member");
  const role = await requireGroupRole(db, principal, run.groupId, "member");
  if (run.submittedBy !== principal.userId && role !== "admin" && !principal.isSiteAdmin) {
    throw forbidden("Only the person who submitted the run, or a group admin, can cancel it.");
  }
  if ((FINAL_RUN_STATES as RunState[]).includes(run.state))
    throw conflict(`The run is already ${run.state}.`);
  await withClientTransaction(deps.pool, async ({ db: tx, executeSql }) => {
    const actor = { kind: "user" as const, userId: principal.userId };
    const beforeScheduler =
      BEFORE_SCHEDULER.includes(run.state) ||
      (run.state === "held" && BEFORE_SCHEDULER.includes(run.heldFromState ?? "queued"));
    const stopped =
      beforeScheduler &&
      (await transitionRun(tx, runId, [run.state], "cancelled", {
        actor,
        message: "Cancelled before it reached the scheduler",
        set: {
          cancelRequestedAt: new Date(),
          cancelRequestedBy: principal.userId,
          finishedAt: new Date(),
          chargedCoreSeconds: 0,
          waitingForSlotSince: null,
        },
      }));
    if (stopped) {
      await tx.insert(ledgerEntries).values({
        allocationId: run.allocationId,
        runId,
        kind: "release",
        coreSeconds: run.reservedCoreSeconds,
        note: "cancelled before start",
      });
    } else {
      await tx
        .update(runs)
        .set({ cancelRequestedAt: new Date(), cancelRequestedBy: principal.userId, updatedAt: new Date() })
        .where(eq(runs.id, runId));
      await deps.boss.send(RUN_STEP_QUEUES.cancel, { runId }, { db: { executeSql: executeSql as never } });
    }
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: run.groupId,
      action: "run.cancel",
      targetType: "run",
      targetId: runId,
      ip,
    });
  });
  return (await getRunSummary(db, runId))!;
}

/** A new run from the original's spec exactly as stored, with only what `changes` names changed. */
export async function resubmitRun(
  deps: RunDeps,
  principal: Principal,
  runId: string,
  request: ResubmitRunRequest,
  ip: string | null,
): Promise<RunSummary> {
  const original = await visibleRun(deps.db, principal, runId, "member");
  const spec = applySpecChanges(runSpecSchema.parse(original.spec), request.changes);
  return createRun(
    deps,
    principal,
    original.groupId,
    { spec, onDuplicate: request.onDuplicate },
    { resubmittedFrom: runId, ip },
  );
}

export async function readRunLog(
  db: Database,
  principal: Principal,
  runId: string,
  afterSeq: number,
  limit = 500,
) {
  const run = await visibleRun(db, principal, runId, "collaborator");
  // A run that reused results has no log of its own: it serves the log of the run that produced them.
  const chunks = await db
    .select({ seq: runLogChunks.seq, text: runLogChunks.text, at: runLogChunks.at })
    .from(runLogChunks)
    .where(and(eq(runLogChunks.runId, run.reusedFrom ?? run.id), gt(runLogChunks.seq, afterSeq)))
    .orderBy(runLogChunks.seq)
    .limit(limit);
  return {
    chunks: chunks.map((c) => ({ seq: c.seq, text: c.text, at: c.at.toISOString() })),
    lastSeq: chunks.at(-1)?.seq ?? afterSeq,
  };
}
