/** The scheduler adapter for a host's configured kind. */
import { directScheduler } from "./direct";
import { slurmScheduler } from "./slurm";
import type { SchedulerAdapter } from "./types";

export type { JobRef, JobStatus, JobSubmission, SchedulerAdapter } from "./types";

const ADAPTERS: Record<SchedulerAdapter["kind"], SchedulerAdapter> = {
  direct: directScheduler,
  slurm: slurmScheduler,
};

export function schedulerFor(kind: SchedulerAdapter["kind"]): SchedulerAdapter {
  const adapter = ADAPTERS[kind];
  if (!adapter) throw new Error(`no scheduler adapter for "${String(kind)}"`);
  return adapter;
}
