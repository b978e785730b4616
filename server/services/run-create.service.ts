/**
 * Run creation: validation, plan, fingerprint, reservation and enqueueing in one transaction, or
 * reusing the results of an identical finished run. The worker carries a run forward from `queued`.
 */
import { randomBytes } from "node:crypto";
import { and, desc, eq, isNull } from "drizzle-orm";
import type pg from "pg";
import type PgBoss from "pg-boss";
import { coreHoursFromSeconds } from "../../shared/core-hours";
import type { OnDuplicate, RunSpec, RunSpecRequest, RunSummary } from "../../shared/schemas/runs";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { withClientTransaction } from "../db/client-transaction";
import { hosts, runEvents, runs } from "../db/schema";
import { buildRunPlan, ExtraFileProblem, runFingerprint } from "../execution/run-plan";
import { resolveResources } from "../execution/run-spec";
import { targetFingerprintPart, targetTemplateContext } from "../execution/target-context";
import { AppError, conflict } from "../http/errors";
import { RUN_STEP_QUEUES } from "../queue/queues";
import { requireGroupRole } from "./access";
import { activeAllocation, reserveAgainstAllocation } from "./allocations.service";
import { requireStageCodesOn } from "./code-hosts.service";
import { chooseAccount } from "./host-accounts.service";
import { getRunSummary } from "./run-reads.service";
import { holdStageCodes, loadStages } from "./run-stages.service";
import { loadRunTarget } from "./targets.service";

export type RunDeps = { db: Database; pool: pg.Pool; boss: PgBoss };

/** Remote folder of a run below the host's base folder; only names we generate. */
export const RUN_DIR_PREFIX = "sf-run-";
export const remoteRunDir = (baseDir: string, runId: string) => `${baseDir}/${RUN_DIR_PREFIX}${runId}`;

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
    .select({ id: runs.id, name: runs.name, finishedAt: runs.finishedAt, resultsState: runs.resultsState })
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

/**
 * Everything a submission checks and renders before it writes: the caller's role, the host and the
 * account it would use, the stages with their parameters validated against each code's schema, the
 * target's latest version, the resolved resources, the plan (input files and batch script) and the
 * fingerprint with the latest finished run that has it. Writes nothing, so the preview of a run
 * (run-preview.service.ts) answers exactly what submitting would.
 */
export async function prepareRun(
  db: Database,
  principal: Principal,
  groupId: string,
  request: RunSpecRequest,
) {
  await requireGroupRole(db, principal, groupId, "member");
  const host = await loadHost(db, groupId, request.hostId);
  const account = await chooseAccount(db, host.id, principal.userId);
  if (!account) {
    throw new AppError(
      422,
      "no_host_account",
      `You have no account on ${host.name} and the group has none: add one under the host's accounts.`,
    );
  }
  const inputs = await loadStages(db, groupId, request);
  await requireStageCodesOn(db, host, inputs);
  // The latest version of the target now; the run keeps this version whatever is saved later.
  const target = request.targetId ? await loadRunTarget(db, groupId, request.targetId) : null;
  // Stored with the resources it got, so a resubmission starts from exactly what this run asked for.
  const spec: RunSpec = {
    ...request,
    resources: resolveResources(
      request.resources,
      inputs.map((input) => input.definition),
    ),
  };
  const runId = crypto.randomUUID();
  let plan: ReturnType<typeof buildRunPlan>;
  try {
    plan = buildRunPlan(
      runId,
      spec.name,
      inputs,
      target ? targetTemplateContext(target) : null,
      spec.extraFiles ?? [],
    );
  } catch (error) {
    if (error instanceof ExtraFileProblem)
      throw new AppError(
        422,
        "validation_failed",
        `The extra files do not fit the recipe: ${error.message}`,
        error.problems,
      );
    throw new AppError(422, "template_failed", (error as Error).message);
  }
  const fingerprint = runFingerprint(inputs, plan, target ? targetFingerprintPart(target) : null);
  const reusable = await findReusable(db, groupId, fingerprint);
  return { host, account, inputs, target, spec, runId, plan, fingerprint, reusable };
}

export async function createRun(
  deps: RunDeps,
  principal: Principal,
  groupId: string,
  request: { spec: RunSpecRequest; onDuplicate: OnDuplicate },
  extra: { resubmittedFrom?: string; ip?: string | null } = {},
): Promise<RunSummary> {
  const { db } = deps;
  const { host, account, inputs, target, spec, runId, plan, fingerprint, reusable } = await prepareRun(
    db,
    principal,
    groupId,
    request.spec,
  );
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
    // Again under the codes' locks: retiring a code or moving it to other hosts waits for this run.
    await holdStageCodes(tx, inputs);
    await requireStageCodesOn(tx, host, inputs);
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
      targetId: target?.target.id ?? null,
      targetVersionId: target?.version.id ?? null,
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
      // A reusing run derives its own results (its analysis options may differ) from the reused files.
      resultsState: reuse ? "pending" : null,
    });
    await tx.insert(runEvents).values({
      runId,
      toState: reuse ? "done" : "queued",
      actor: "user",
      actorUserId: principal.userId,
      message: reuse ? `Reused the results of run ${reuse.id}` : "Submitted",
    });
    await deps.boss.send(
      reuse ? RUN_STEP_QUEUES.postprocess : RUN_STEP_QUEUES.stage,
      { runId },
      { db: { executeSql: executeSql as never } },
    );
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: reuse ? "run.reuse" : "run.create",
      targetType: "run",
      targetId: runId,
      details: {
        name: spec.name,
        fingerprint,
        target: target ? { id: target.target.id, version: target.version.version } : null,
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
      const neededCoreHours = coreHoursFromSeconds(reserveCoreSeconds);
      const availableCoreHours = coreHoursFromSeconds(Math.max(available, 0));
      throw new AppError(
        422,
        "allocation_exceeded",
        `This run needs ${neededCoreHours} core-hours (cores × wall-time limit) but ${allocation.name} has ${availableCoreHours} left.`,
        { neededCoreHours, availableCoreHours },
      );
    }
  });
  return (await getRunSummary(db, runId))!;
}
