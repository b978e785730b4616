/**
 * Reading runs: summaries (the list: run-list.service), the detail page (events, collected files, timings in stage order), one
 * collected file (the log: run-log.service). Every read checks the caller's role.
 */
import { and, eq } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { coreHoursFromSeconds } from "../../shared/core-hours";
import {
  type RunDetail,
  type RunProgress,
  type RunSummary,
  runSpecSchema,
  runStageProgressSchema,
} from "../../shared/schemas/runs";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { runArtifacts, runEvents, runs, runTimings, targets, targetVersions, users } from "../db/schema";
import type { RunPlan } from "../execution/run-plan";
import { orderTimings } from "../execution/timings-order";
import { AppError, notFound } from "../http/errors";
import { requireGroupRole } from "./access";

const canceller = alias(users, "canceller");
const summaryColumns = {
  run: runs,
  submittedByName: users.displayName,
  cancelRequestedByName: canceller.displayName,
  targetName: targets.name,
  targetVersion: targetVersions.version,
};

/** Runs with the names of who submitted them and who asked to cancel them, and their target's. */
export function selectSummaries(db: Database) {
  return db
    .select(summaryColumns)
    .from(runs)
    .leftJoin(users, eq(users.id, runs.submittedBy))
    .leftJoin(canceller, eq(canceller.id, runs.cancelRequestedBy))
    .leftJoin(targets, eq(targets.id, runs.targetId))
    .leftJoin(targetVersions, eq(targetVersions.id, runs.targetVersionId));
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

export function toSummary(row: {
  run: typeof runs.$inferSelect;
  submittedByName: string | null;
  cancelRequestedByName: string | null;
  targetName: string | null;
  targetVersion: number | null;
}): RunSummary {
  const r = row.run;
  return {
    id: r.id,
    groupId: r.groupId,
    name: r.name,
    recipeId: r.recipeId,
    hostId: r.hostId,
    targetId: r.targetId,
    targetVersion: row.targetVersion,
    targetName: row.targetName,
    state: r.state,
    stateMessage: r.stateMessage,
    fingerprint: r.fingerprint,
    cores: r.cores,
    wallTimeMinutes: r.wallTimeMinutes,
    reservedCoreHours: coreHoursFromSeconds(r.reservedCoreSeconds),
    chargedCoreHours: r.chargedCoreSeconds === null ? null : coreHoursFromSeconds(r.chargedCoreSeconds),
    schedulerJobId: r.schedulerJobId,
    exitCode: r.exitCode,
    resubmittedFrom: r.resubmittedFrom,
    reusedFrom: r.reusedFrom,
    submittedById: r.submittedBy,
    submittedByName: row.submittedByName,
    cancelRequested: r.cancelRequestedAt !== null,
    cancelRequestedByName: r.cancelRequestedAt === null ? null : row.cancelRequestedByName,
    progress: progressOf(r),
    resultsState: r.resultsState,
    resultsMessage: r.resultsMessage,
    createdAt: r.createdAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
  };
}

export async function getRunSummary(db: Database, runId: string): Promise<RunSummary | null> {
  const [row] = await selectSummaries(db).where(eq(runs.id, runId));
  return row ? toSummary(row) : null;
}

/** Loads a run the caller may see (any role in its group), or 404. */
export async function visibleRun(
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
    db.select().from(runTimings).where(eq(runTimings.runId, artifactRunId)).orderBy(runTimings.stage),
  ]);
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
    // Stages in the order they run, symmetries in their character table's order.
    timings: orderTimings(
      timings.map((t) => ({ stage: t.stage, symmetry: t.symmetry, durationSeconds: t.elapsedMs / 1000 })),
      run.plan as RunPlan,
    ),
  };
}

export async function readArtifact(db: Database, principal: Principal, runId: string, artifactId: string) {
  const run = await visibleRun(db, principal, runId, "collaborator");
  const [artifact] = await db
    .select()
    .from(runArtifacts)
    .where(and(eq(runArtifacts.id, artifactId), eq(runArtifacts.runId, run.reusedFrom ?? run.id)));
  if (!artifact) throw notFound("Collected file");
  return artifact;
}
