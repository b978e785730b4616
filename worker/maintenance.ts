/**
 * The worker's timers: the per-host poll (one poller per host across all worker processes, by advisory
 * lock), the probe that resumes held runs when their host answers again, and the reconciler that
 * re-attaches to runs in flight when a worker starts.
 */
import { and, eq, inArray, isNotNull, sql } from "drizzle-orm";
import { withClientTransaction } from "../server/db/client-transaction";
import { hosts, runs } from "../server/db/schema";
import { transitionRun } from "../server/execution/run-transitions";
import { RUN_STEP_QUEUES } from "../server/queue/queues";
import type { RunState } from "../shared/schemas/runs";
import type { WorkerContext } from "./context";
import type { HeldStep } from "./failures";
import { groupBy } from "./group-by";
import { wakeWaitingRuns } from "./host-slots";
import { sessionFor } from "./run-runtime";
import { markHost, pollHost } from "./steps/poll";

const worker = { kind: "worker" } as const;

/**
 * Polls each host with active runs, at most one poller per host at a time across worker processes, then
 * hands runs waiting for a host slot back to staging where slots came free.
 */
export async function pollAllHosts(ctx: WorkerContext): Promise<void> {
  await pollHostsWithActiveRuns(ctx);
  await stopFollowingInactiveRuns(ctx);
  await wakeWaitingRuns(ctx);
}

/** Streamed logs of runs that were cancelled, held or settled meanwhile stop being streamed. */
async function stopFollowingInactiveRuns(ctx: WorkerContext): Promise<void> {
  if (ctx.logFollowers.stats().followed === 0) return;
  const active = await ctx.db
    .select({ id: runs.id })
    .from(runs)
    .where(inArray(runs.state, ["submitted", "running"]));
  await ctx.logFollowers.retain(new Set(active.map((run) => run.id)));
}

async function pollHostsWithActiveRuns(ctx: WorkerContext): Promise<void> {
  const rows = await ctx.db
    .selectDistinct({ hostId: runs.hostId })
    .from(runs)
    .where(inArray(runs.state, ["submitted", "running"]));
  await Promise.all(
    rows.map(async ({ hostId }) => {
      const client = await ctx.pool.connect();
      const lockKey = `poll:${hostId}`;
      try {
        const { rows: lock } = await client.query(
          "select pg_try_advisory_lock(hashtextextended($1, 0)) as ok",
          [lockKey],
        );
        if (!lock[0]?.ok) return;
        try {
          await pollHost(ctx, hostId);
        } finally {
          await client.query("select pg_advisory_unlock(hashtextextended($1, 0))", [lockKey]);
        }
      } catch (error) {
        ctx.log.error({ err: error, hostId }, "poll of host failed");
      } finally {
        client.release();
      }
    }),
  );
}

/**
 * Resumes held runs whose host answers again — never while the host's key is mismatched or a replaced
 * key is not yet confirmed by an admin. The host is probed with each account the held runs use: one
 * account the host refuses must neither keep the other accounts' runs held nor be resumed with them.
 */
export async function resumeHeldRuns(ctx: WorkerContext): Promise<number> {
  const held = await ctx.db
    .select({ run: runs, host: hosts })
    .from(runs)
    .innerJoin(hosts, eq(hosts.id, runs.hostId))
    .where(
      and(
        eq(runs.state, "held"),
        sql`${hosts.status} <> 'key_mismatch'`,
        isNotNull(hosts.hostKeyConfirmedAt),
        isNotNull(runs.heldFromState),
      ),
    );
  const byHostAccount = groupBy(held, (row) => `${row.host.id}:${row.run.hostAccountId}`);
  let resumed = 0;
  for (const rows of byHostAccount.values()) {
    const host = rows[0]!.host;
    try {
      const session = await sessionFor(ctx, host, rows[0]!.run.hostAccountId);
      await session.run(["true"], { timeoutMs: 10_000 });
    } catch {
      continue;
    }
    if (host.status !== "ok") await markHost(ctx, host, "ok", null);
    for (const { run } of rows) {
      const back = run.heldFromState as RunState;
      await withClientTransaction(ctx.pool, async ({ db: tx, executeSql }) => {
        const moved = await transitionRun(tx, run.id, ["held"], back, {
          actor: worker,
          message: `Resumed: ${host.name} answers again`,
          set: { heldStep: null, heldFromState: null, transportAttempts: 0 },
        });
        if (!moved) return;
        resumed += 1;
        const step = run.heldStep as HeldStep | null;
        const db = { db: { executeSql: executeSql as never } };
        if (step && step !== "poll") await ctx.boss.send(RUN_STEP_QUEUES[step], { runId: run.id }, db);
        if (run.cancelRequestedAt && (back === "submitted" || back === "running")) {
          await ctx.boss.send(RUN_STEP_QUEUES.cancel, { runId: run.id }, db);
        }
      });
    }
  }
  // A pass that resumes nothing changes no row; this line is the only sign that it ran (the
  // integration tests wait for it before checking that a held run stayed held).
  ctx.log.debug({ heldRuns: held.length, resumed }, "held runs probed");
  return resumed;
}

/**
 * At start: queue items may have been lost with a killed worker or never sent; every run in flight gets
 * the item for its step again. Steps re-read the row, so a duplicate is harmless.
 */
export async function reconcileRunsInFlight(ctx: WorkerContext): Promise<number> {
  const inFlight = await ctx.db
    .select({ id: runs.id, state: runs.state, cancelRequestedAt: runs.cancelRequestedAt })
    .from(runs)
    .where(inArray(runs.state, ["queued", "staging", "collecting", "submitted", "running"]));
  for (const run of inFlight) {
    if (run.state === "queued" || run.state === "staging")
      await ctx.boss.send(RUN_STEP_QUEUES.stage, { runId: run.id });
    if (run.state === "collecting") await ctx.boss.send(RUN_STEP_QUEUES.collect, { runId: run.id });
    if (run.cancelRequestedAt && (run.state === "submitted" || run.state === "running")) {
      await ctx.boss.send(RUN_STEP_QUEUES.cancel, { runId: run.id });
    }
  }
  return inFlight.length;
}

/** Repeats `fn` every `intervalMs` (never overlapping itself) until the returned stop is called. */
export function every(
  intervalMs: number,
  fn: () => Promise<unknown>,
  onError: (error: unknown) => void,
): () => Promise<void> {
  let stopped = false;
  let current: Promise<unknown> = Promise.resolve();
  let timer: NodeJS.Timeout | undefined;
  const tick = () => {
    current = fn()
      .catch(onError)
      .finally(() => {
        if (!stopped) timer = setTimeout(tick, intervalMs);
      });
  };
  timer = setTimeout(tick, 0);
  return async () => {
    stopped = true;
    clearTimeout(timer);
    await current;
  };
}
