/**
 * `poll`, batched per host: one scheduler query for all of a host's active runs (per account), then new
 * log bytes of each run read from its byte offset, stored as numbered chunks, and parsed into timings and
 * progress. A run whose job ended moves to `collecting`.
 */
import { and, eq, inArray } from "drizzle-orm";
import { withClientTransaction } from "../../server/db/client-transaction";
import { hosts, runs } from "../../server/db/schema";
import { transitionRun } from "../../server/execution/run-transitions";
import { RUN_STEP_QUEUES } from "../../server/queue/queues";
import type { WorkerContext } from "../context";
import { guardStep, holdHostRuns, holdRefusedAccountRuns } from "../failures";
import { groupBy } from "../group-by";
import { appendLogChunk, type LogPosition } from "../logs/log-store";
import { compileOutputRules } from "../logs/output-rules";
import { storedProgress } from "../logs/progress";
import { DEFAULT_LOG_CHUNK_BYTES, readLogBytesFrom } from "../logs/tail";
import { type HostRow, jobRefOf, loadHost, loadRun, planOf, type RunRow, sessionFor } from "../run-runtime";
import { schedulerFor } from "../schedulers";
import type { JobStatus } from "../schedulers/types";
import {
  AuthenticationError,
  HostKeyMismatchError,
  HostKeyUnconfirmedError,
  TransportError,
} from "../ssh/errors";
import type { RemoteSession } from "../ssh/pool";

const worker = { kind: "worker" } as const;
/** Enough bytes per poll to keep up with a chatty code without holding a poll for long. */
const MAX_LOG_BYTES_PER_POLL = DEFAULT_LOG_CHUNK_BYTES;
/** Reads of a job that has ended, per poll (16 MiB); a longer log is read on over the next polls. */
const MAX_LOG_ROUNDS_AFTER_END = 64;

/**
 * Stores the log bytes after the run's offset as numbered chunks, exactly as read (never decoded), and
 * reads a decoded copy for timings and progress. While the job runs: one read, cut after its last
 * newline (or the whole read, minus a trailing partial character, when it is full and holds none).
 * Once the job has ended (`untilEnd`): reads on to the end of the file, the last line too. Returns
 * whether the whole file is stored (always false while the job runs).
 */
async function storeLog(
  ctx: WorkerContext,
  run: RunRow,
  session: RemoteSession,
  untilEnd: boolean,
): Promise<boolean> {
  const plan = planOf(run);
  const rules = compileOutputRules(plan);
  let position: LogPosition = {
    offsetBytes: run.logOffsetBytes,
    seq: run.logSeq,
    progress: storedProgress(run.progress),
  };
  for (let round = 0; round < (untilEnd ? MAX_LOG_ROUNDS_AFTER_END : 1); round += 1) {
    const chunk = await readLogBytesFrom(
      session,
      `${run.remoteDir}/${plan.logName}`,
      position.offsetBytes,
      MAX_LOG_BYTES_PER_POLL,
      { includePartialLine: untilEnd },
    );
    if (chunk.bytes.length === 0) return untilEnd && chunk.endOfFile;
    // Cuts fall after a newline, or at a character's end in a full line-less read, so the parsed copy
    // holds whole characters.
    const next = await appendLogChunk(ctx, run.id, rules, position, chunk.bytes);
    // Another reader of this log got there first: it carries on from its own offset.
    if (!next) return false;
    position = next;
    if (chunk.endOfFile) return untilEnd;
  }
  return false;
}

async function applyStatus(
  ctx: WorkerContext,
  run: RunRow,
  status: JobStatus,
  session: RemoteSession,
): Promise<void> {
  if (status.state === "pending" || status.state === "unknown") return;
  if (run.state === "submitted") {
    await ctx.db.transaction((tx) =>
      transitionRun(tx, run.id, ["submitted"], "running", {
        actor: worker,
        message: "Started on the host",
        set: { startedAt: status.startedAt ?? new Date() },
      }),
    );
  }
  const finished = status.state !== "running";
  if (!finished) {
    // A streamed log is stored as it is written; the poll reads only logs that are not streamed.
    if (await ctx.logFollowers.follow(run, session)) return;
    await storeLog(ctx, run, session, false);
    return;
  }
  let logStored: boolean;
  if (ctx.logFollowers.isFollowing(run.id)) {
    // The rest of the log, the last line too, is read from where the stream got to.
    await ctx.logFollowers.stop(run.id);
    const current = await loadRun(ctx, run.id);
    if (!current) return;
    logStored = await storeLog(ctx, current, session, true);
  } else {
    logStored = await storeLog(ctx, run, session, true);
  }
  // The run moves on only with its whole log stored; a longer one is read on at the next poll.
  if (!logStored) return;
  // A job the scheduler calls failed is never a success, even if its exit code has not arrived yet.
  const exitCode =
    status.state === "completed" ? (status.exitCode ?? 0) : status.exitCode === 0 ? null : status.exitCode;
  await withClientTransaction(ctx.pool, async ({ db: tx, executeSql }) => {
    const moved = await transitionRun(tx, run.id, ["submitted", "running"], "collecting", {
      actor: worker,
      message: `The scheduler reports the job ${status.state}${status.exitCode !== null ? ` (exit code ${status.exitCode})` : ""}`,
      set: { exitCode, startedAt: run.startedAt ?? status.startedAt ?? new Date() },
    });
    if (moved)
      await ctx.boss.send(
        RUN_STEP_QUEUES.collect,
        { runId: run.id },
        { db: { executeSql: executeSql as never } },
      );
  });
}

const lastHostSuccess = new Map<string, number>();

/** Polls every active run of one host. Transport trouble long enough holds the host's runs. */
export async function pollHost(ctx: WorkerContext, hostId: string): Promise<void> {
  const host = await loadHost(ctx, hostId);
  if (host.status === "key_mismatch") return;
  if (!host.hostKeyConfirmedAt) {
    // A replaced key nobody confirmed yet: no connection with it; the runs wait for an admin.
    await holdHostRuns(ctx, hostId, `Held: ${new HostKeyUnconfirmedError(host.name).message}.`);
    return;
  }
  const active = await ctx.db
    .select()
    .from(runs)
    .where(and(eq(runs.hostId, hostId), inArray(runs.state, ["submitted", "running"])));
  if (active.length === 0) return;
  const scheduler = schedulerFor(host.scheduler);
  const byAccount = groupBy(active, (run) => run.hostAccountId);
  try {
    for (const [accountId, accountRuns] of byAccount) {
      const session = await sessionFor(ctx, host, accountId);
      let statuses: Map<string, JobStatus>;
      try {
        statuses = await scheduler.states(session, accountRuns.map(jobRefOf));
      } catch (error) {
        // A refused account holds its own runs only; every other account on the host is still polled.
        if (!(error instanceof AuthenticationError)) throw error;
        await holdRefusedAccountRuns(ctx, accountRuns, host, error);
        continue;
      }
      await Promise.all(
        accountRuns.map(async (run) => {
          const status = statuses.get(run.schedulerJobId ?? "");
          if (!status) return;
          await guardStep(ctx, run, host, "collect", () => applyStatus(ctx, run, status, session));
        }),
      );
    }
    lastHostSuccess.set(hostId, Date.now());
    if (host.status !== "ok") await markHost(ctx, host, "ok", null);
  } catch (error) {
    if (error instanceof HostKeyMismatchError) {
      await guardStep(ctx, active[0]!, host, "collect", () => Promise.reject(error));
      return;
    }
    if (!(error instanceof TransportError)) throw error;
    const since = lastHostSuccess.get(hostId) ?? Date.now();
    if (!lastHostSuccess.has(hostId)) lastHostSuccess.set(hostId, since);
    if (Date.now() - since >= ctx.config.hostUnreachableHoldMs) {
      await markHost(ctx, host, "unreachable", error.message);
      await holdHostRuns(
        ctx,
        hostId,
        `Held: ${host.name} has been unreachable since ${new Date(since).toISOString()} (${error.message}).`,
      );
      lastHostSuccess.delete(hostId);
    }
    ctx.log.warn({ hostId, err: error.message }, "poll failed");
  }
}

export async function markHost(
  ctx: WorkerContext,
  host: HostRow,
  status: "ok" | "unreachable",
  message: string | null,
) {
  await ctx.db
    .update(hosts)
    .set({ status, statusMessage: message, statusChangedAt: new Date() })
    .where(eq(hosts.id, host.id));
}
