/**
 * One interface for every way a host runs jobs. Adapters hold no state: everything they need is in the
 * JobRef (the run folder, the run's submit token, the scheduler's job id once known), so any worker
 * process can pick up any run.
 */
import type { RemoteSession } from "../ssh/session";

export type JobRef = {
  /** The run folder on the host (as prepareRunDir returned it). */
  runDir: string;
  /** Unique per run, written into the scheduler job's name before anything else, so a repeated submit finds it. */
  token: string;
  jobId?: string | null;
  /** The job's combined stdout+stderr, relative to runDir. */
  logName: string;
};

export type JobSubmission = JobRef & {
  cores: number;
  /** The limit after which the scheduler stops the job; fractions of a minute count to the second. */
  wallTimeMinutes: number;
  /**
   * Direct only: seconds between TERM and KILL when the job reaches its limit (Slurm uses the cluster's
   * KillWait); the adapter's default when absent.
   */
  wallTimeGraceSeconds?: number;
  /** The batch script, relative to runDir. */
  scriptName: string;
  /** Slurm only: partition and account to charge; the cluster's defaults when absent. */
  partition?: string;
  account?: string;
};

export type JobState = "pending" | "running" | "completed" | "failed" | "cancelled" | "unknown";

export type JobStatus = {
  state: JobState;
  exitCode: number | null;
  /** The scheduler stopped the job at its wall-time limit (Slurm's TIMEOUT); such a job is "failed". */
  timedOut?: boolean;
  startedAt?: Date;
  endedAt?: Date;
};

export type JobAccounting = {
  elapsedSeconds: number;
  coreSeconds: number;
  /** Whether the scheduler stopped the job at its wall-time limit. */
  timedOut: boolean;
};

export interface SchedulerAdapter {
  kind: "direct" | "slurm";
  /** Idempotent: a job already submitted for this token is returned with alreadySubmitted = true. */
  submit(session: RemoteSession, job: JobSubmission): Promise<{ jobId: string; alreadySubmitted: boolean }>;
  /**
   * The state of every listed job in one or two remote commands, keyed by job id (`job.jobId`; the direct
   * adapter falls back to the recorded process id). Jobs the scheduler has no record of are "unknown".
   */
  states(session: RemoteSession, jobs: JobRef[]): Promise<Map<string, JobStatus>>;
  /** Asks the job to stop; harmless for a job that already ended. */
  cancel(session: RemoteSession, job: JobRef): Promise<void>;
  /** Elapsed wall time and core-seconds used; null when the scheduler has no figures (yet). */
  accounting(session: RemoteSession, job: JobRef, cores: number): Promise<JobAccounting | null>;
}
