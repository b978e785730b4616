/**
 * What a step does when something goes wrong. Transport trouble (refused, timed out, dropped) is
 * retried with exponential backoff and full jitter, then the run is `held` for a person; a changed host
 * key holds every run of the host at once and tells the group's admins; anything the run itself got wrong
 * (a remote command failing, a path refused) fails the run with the reason. Database errors are rethrown
 * so pg-boss retries the item once PostgreSQL is back.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import { recordAudit } from "../server/audit/record-audit";
import { hostAccounts, hosts, ledgerEntries, memberships, runs, users } from "../server/db/schema";
import { transitionRun } from "../server/execution/run-transitions";
import { RUN_STEP_QUEUES, type RunStepName } from "../server/queue/queues";
import { escapeHtml } from "../shared/html";
import { type RunState, UNFINISHED_RUN_STATES } from "../shared/schemas/runs";
import type { WorkerContext } from "./context";
import type { HostRow, RunRow } from "./run-runtime";
import {
  AuthenticationError,
  HostKeyMismatchError,
  HostKeyUnconfirmedError,
  RemoteCommandError,
  RemoteFileError,
  RemotePathError,
  TransportError,
} from "./ssh/errors";

/** Steps a held run repeats when it resumes; `poll` means the poller picks it up again. */
export type HeldStep = RunStepName | "poll";

const worker = { kind: "worker" } as const;

export function backoffMs(attempt: number, baseMs: number, maxMs: number, random = Math.random): number {
  const ceiling = Math.min(maxMs, baseMs * 2 ** Math.max(0, attempt - 1));
  return Math.round(ceiling / 2 + random() * (ceiling / 2));
}

/** A step's copy of the run may be older than the row, so both helpers re-read its state. */
async function currentState(
  tx: Parameters<Parameters<WorkerContext["db"]["transaction"]>[0]>[0],
  runId: string,
) {
  const [row] = await tx
    .select({ state: runs.state, heldFromState: runs.heldFromState })
    .from(runs)
    .where(eq(runs.id, runId))
    .for("update");
  return row ?? null;
}

export async function holdRun(
  ctx: WorkerContext,
  run: RunRow,
  step: HeldStep,
  message: string,
): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const now = await currentState(tx, run.id);
    if (!now || now.state === "held" || !UNFINISHED_RUN_STATES.includes(now.state)) return;
    await transitionRun(tx, run.id, [now.state], "held", {
      actor: worker,
      message,
      set: { heldStep: step, heldFromState: now.state },
    });
  });
}

export async function failRun(ctx: WorkerContext, run: RunRow, message: string): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const now = await currentState(tx, run.id);
    if (!now || !UNFINISHED_RUN_STATES.includes(now.state)) return;
    const changed = await transitionRun(tx, run.id, [now.state], "failed", {
      actor: worker,
      message,
      set: { finishedAt: new Date(), chargedCoreSeconds: run.chargedCoreSeconds ?? 0 },
    });
    if (changed && run.chargedCoreSeconds === null) {
      await tx.insert(ledgerEntries).values({
        allocationId: run.allocationId,
        runId: run.id,
        kind: "release",
        coreSeconds: run.reservedCoreSeconds,
        note: "run failed before it was charged",
      });
    }
  });
}

async function tellAdminsAboutHostKey(
  ctx: WorkerContext,
  host: HostRow,
  error: HostKeyMismatchError,
): Promise<void> {
  const message = `${host.name} (${host.address}:${host.port}) presented host key ${error.actualFingerprint}, but ${error.expectedFingerprint} is pinned. Its runs are held. Check with the host's administrators, then refresh and confirm the key in Sigmaflow.`;
  const changed = await ctx.db
    .update(hosts)
    .set({ status: "key_mismatch", statusMessage: message, statusChangedAt: new Date() })
    .where(and(eq(hosts.id, host.id), sql`${hosts.status} <> 'key_mismatch'`))
    .returning({ id: hosts.id });
  if (changed.length === 0) return;
  await recordAudit(ctx.db, {
    actorUserId: null,
    groupId: host.groupId,
    action: "host.key_mismatch",
    targetType: "host",
    targetId: host.id,
    details: { expected: error.expectedFingerprint, actual: error.actualFingerprint },
  });
  const admins = await ctx.db
    .select({ email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.groupId, host.groupId), eq(memberships.role, "admin")));
  for (const admin of admins) {
    await ctx.mailer
      .send({
        to: admin.email,
        subject: `Sigmaflow: host key of ${host.name} changed`,
        text: message,
        html: `<p>${escapeHtml(message)}</p>`,
      })
      .catch((mailError: unknown) => ctx.log.warn({ err: mailError }, "could not mail host-key warning"));
  }
}

const IN_FLIGHT: RunState[] = ["queued", "staging", "submitted", "running", "collecting"];

function heldStepFor(state: RunState): HeldStep {
  if (state === "collecting") return "collect";
  if (state === "submitted" || state === "running") return "poll";
  return "stage";
}

/** Holds every in-flight run of a host (host key changed, or unreachable for too long). */
export async function holdHostRuns(ctx: WorkerContext, hostId: string, message: string): Promise<number> {
  const inFlight = await ctx.db
    .select()
    .from(runs)
    .where(and(eq(runs.hostId, hostId), inArray(runs.state, IN_FLIGHT)));
  for (const run of inFlight) await holdRun(ctx, run, heldStepFor(run.state), message);
  return inFlight.length;
}

/**
 * The held reason when the host refuses a run's account: which account (user name @ host, personal or
 * group), since a member's personal account takes priority and a wrong one holds all their runs there.
 */
async function refusedAccountMessage(
  ctx: WorkerContext,
  run: RunRow,
  host: HostRow | null,
  error: AuthenticationError,
): Promise<string> {
  const [found] = await ctx.db
    .select({ username: hostAccounts.username, ownerUserId: hostAccounts.ownerUserId, hostName: hosts.name })
    .from(hostAccounts)
    .innerJoin(hosts, eq(hosts.id, hostAccounts.hostId))
    .where(eq(hostAccounts.id, run.hostAccountId));
  if (!found) {
    return `Held: the host refused the run's account (${error.message}). Install the account's public key on the host, then the run resumes.`;
  }
  const account = `${found.username}@${host?.name ?? found.hostName}`;
  return found.ownerUserId === null
    ? `Held: the host refused the group account ${account} (${error.message}). Install the account's public key for ${found.username} on the host, then the run resumes.`
    : `Held: the host refused the personal account ${account} (${error.message}). Install the account's public key for ${found.username} on the host, then the run resumes; or disable or replace the account, and new runs use the group account or the replacement.`;
}

/**
 * Holds runs the host is polled for when it refuses their account: only that account's runs, with the
 * reason naming the account. The host and its other accounts' runs carry on.
 */
export async function holdRefusedAccountRuns(
  ctx: WorkerContext,
  accountRuns: RunRow[],
  host: HostRow,
  error: AuthenticationError,
): Promise<void> {
  const first = accountRuns[0];
  if (!first) return;
  const message = await refusedAccountMessage(ctx, first, host, error);
  for (const run of accountRuns) await holdRun(ctx, run, heldStepFor(run.state), message);
}

/**
 * Runs `fn` for a step of `run`; on failure decides between retry-later, hold and fail.
 * Returns normally in every handled case, so pg-boss marks the item complete.
 */
export async function guardStep(
  ctx: WorkerContext,
  run: RunRow,
  host: HostRow | null,
  step: RunStepName,
  fn: () => Promise<void>,
): Promise<void> {
  try {
    await fn();
    if (run.transportAttempts > 0) {
      await ctx.db.update(runs).set({ transportAttempts: 0 }).where(eq(runs.id, run.id));
    }
  } catch (error) {
    if (error instanceof HostKeyMismatchError && host) {
      await tellAdminsAboutHostKey(ctx, host, error);
      await holdHostRuns(
        ctx,
        host.id,
        `Held: the host key of ${host.name} changed (${error.actualFingerprint}).`,
      );
      return;
    }
    if (error instanceof TransportError) {
      const attempts = run.transportAttempts + 1;
      if (attempts >= ctx.config.transportMaxAttempts) {
        await holdRun(ctx, run, step, `Held after ${attempts} attempts to reach the host: ${error.message}`);
        return;
      }
      const delayMs = backoffMs(attempts, ctx.config.backoffBaseMs, ctx.config.backoffMaxMs);
      await ctx.db
        .update(runs)
        .set({ transportAttempts: attempts, nextRetryAt: new Date(Date.now() + delayMs) })
        .where(eq(runs.id, run.id));
      await ctx.boss.send(
        RUN_STEP_QUEUES[step],
        { runId: run.id },
        { startAfter: new Date(Date.now() + delayMs) },
      );
      ctx.log.warn(
        { runId: run.id, step, attempts, delayMs, err: error.message },
        "transport trouble, retrying",
      );
      return;
    }
    if (error instanceof HostKeyUnconfirmedError) {
      await holdRun(ctx, run, step, `Held: ${error.message}.`);
      return;
    }
    if (error instanceof AuthenticationError) {
      // Retrying cannot fix a key the host does not accept: a person must install or replace it.
      await holdRun(ctx, run, step, await refusedAccountMessage(ctx, run, host, error));
      return;
    }
    if (
      error instanceof RemoteCommandError ||
      error instanceof RemotePathError ||
      error instanceof RemoteFileError
    ) {
      await failRun(ctx, run, `${step} failed on the host: ${error.message}`);
      return;
    }
    throw error;
  }
}
