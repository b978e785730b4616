/**
 * File names Sigmaflow itself writes into a run folder on a host: the batch script and its log, each
 * stage's arguments file (server/execution/run-plan.ts), and the job records of the schedulers
 * (worker/schedulers/direct.ts, slurm.ts), each also written under a `.tmp` name first and renamed.
 * A code's input files and declared outputs may not use them: a template named `sigmaflow.args` would
 * replace the stage's arguments, an output of that name would overwrite the next stage's.
 */
export const RESERVED_RUN_FILE_NAMES = [
  "job.sh",
  "job.log",
  "sigmaflow.args",
  "submit.lock",
  "job.id",
  "job.pid",
  "job.started",
  "job.ended",
  "job.exit",
  "job.cancelled",
  "job.timedout",
] as const;

const RESERVED = new Set<string>(RESERVED_RUN_FILE_NAMES.flatMap((name) => [name, `${name}.tmp`]));

export function isReservedRunFileName(name: string): boolean {
  return RESERVED.has(name);
}
