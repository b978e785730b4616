/**
 * `cancel`: asks the scheduler to stop a submitted or running job. The run becomes `cancelled` only when
 * the poller sees the job gone (the scheduler confirms), and is then collected and charged what it used.
 */
import type { WorkerContext } from "../context";
import { guardStep } from "../failures";
import { loadRun, runtimeFor } from "../run-runtime";

export async function cancelRunOnHost(ctx: WorkerContext, runId: string): Promise<void> {
  const run = await loadRun(ctx, runId);
  if (!run?.cancelRequestedAt || !run.schedulerJobId) return;
  if (run.state !== "submitted" && run.state !== "running") return;
  const rt = await runtimeFor(ctx, run).catch(() => null);
  await guardStep(ctx, run, rt?.host ?? null, "cancel", async () => {
    const { session, scheduler, job } = rt ?? (await runtimeFor(ctx, run));
    await scheduler.cancel(session, job);
  });
}
