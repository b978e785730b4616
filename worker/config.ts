/** Worker settings from the environment, parsed once at start. */
import { z } from "zod";
import { DEFAULT_LOG_CHUNK_BYTES } from "./logs/tail";

const envSchema = z.object({
  DATABASE_URL: z.string().min(1),
  SIGMAFLOW_SECRETS_KEY: z.string().min(32),
  SIGMAFLOW_PUBLIC_URL: z.string().default("http://127.0.0.1:5180"),
  /** How often each host's runs are polled for state and new log bytes. */
  WORKER_POLL_INTERVAL_MS: z.coerce.number().int().min(100).default(2000),
  /** Stream running jobs' logs as they are written (1) or read them at the poll interval only (0). */
  WORKER_LOG_STREAMING: z.enum(["0", "1"]).default("1"),
  /** Shortest time between two stored chunks of one streamed log. */
  WORKER_LOG_FLUSH_INTERVAL_MS: z.coerce.number().int().min(0).max(10_000).default(50),
  /** Exec slots per SSH connection kept free for run steps; logs are streamed only beyond them. */
  WORKER_LOG_STREAM_SPARE_SLOTS: z.coerce.number().int().min(1).max(64).default(3),
  /** How often pg-boss looks for new step items. */
  WORKER_QUEUE_POLL_SECONDS: z.coerce.number().min(0.5).default(0.5),
  /** Parallel step handlers per queue. */
  WORKER_CONCURRENCY: z.coerce.number().int().min(1).max(64).default(8),
  /** Connections the worker's steps share (pg-boss keeps a few of its own). */
  WORKER_DB_POOL_SIZE: z.coerce.number().int().min(2).max(200).default(10),
  /** Transport failures of one run step before the run is held for a person. */
  WORKER_TRANSPORT_MAX_ATTEMPTS: z.coerce.number().int().min(1).default(6),
  WORKER_BACKOFF_BASE_MS: z.coerce.number().int().min(10).default(1000),
  WORKER_BACKOFF_MAX_MS: z.coerce.number().int().min(10).default(60_000),
  /** A host whose polls keep failing this long gets its runs held. */
  WORKER_HOST_UNREACHABLE_HOLD_MS: z.coerce.number().int().min(0).default(60_000),
  /** How often held runs' hosts are probed so the runs resume by themselves. */
  WORKER_HOLD_PROBE_INTERVAL_MS: z.coerce.number().int().min(100).default(5000),
  SSH_MAX_CONNECTIONS_PER_TARGET: z.coerce.number().int().min(1).default(2),
  SSH_MAX_CHANNELS_PER_CONNECTION: z.coerce.number().int().min(1).default(8),
  /** Direct scheduler: seconds between TERM and KILL when a job reaches its wall-time limit. */
  WORKER_WALL_TIME_GRACE_SECONDS: z.coerce.number().int().min(1).max(600).default(10),
  /** Largest result file collected into the database. */
  WORKER_MAX_ARTIFACT_BYTES: z.coerce
    .number()
    .int()
    .min(1)
    .default(64 * 1024 * 1024),
  /** Child processes that read and derive results at once (a fresh one per postprocess; others wait). */
  WORKER_POSTPROCESS_CONCURRENCY: z.coerce.number().int().min(1).max(16).default(2),
  /** Wall-clock limit of one derivation of results; past it the child is stopped and results fail. */
  WORKER_POSTPROCESS_TIMEOUT_MS: z.coerce.number().int().min(100).default(60_000),
  /** V8 heap limit of a derivation child process; past it the child ends and results fail. */
  WORKER_POSTPROCESS_MAX_HEAP_MB: z.coerce.number().int().min(32).max(16_384).default(512),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().default(5182),
  MAIL_FROM: z.string().default("Sigmaflow <no-reply@sigmaflow.local>"),
  LOG_LEVEL: z.enum(["fatal", "error", "warn", "info", "debug", "trace", "silent"]).default("info"),
});

export type WorkerConfig = ReturnType<typeof loadWorkerConfig>;

export function loadWorkerConfig(env: NodeJS.ProcessEnv = process.env) {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => `  ${issue.path.join(".")}: ${issue.message}`);
    throw new Error(`Invalid Sigmaflow worker configuration:\n${lines.join("\n")}`);
  }
  const e = parsed.data;
  return {
    databaseUrl: e.DATABASE_URL,
    secretsKey: e.SIGMAFLOW_SECRETS_KEY,
    publicUrl: e.SIGMAFLOW_PUBLIC_URL.replace(/\/$/, ""),
    pollIntervalMs: e.WORKER_POLL_INTERVAL_MS,
    queuePollSeconds: e.WORKER_QUEUE_POLL_SECONDS,
    logFollow: {
      enabled: e.WORKER_LOG_STREAMING === "1",
      spareSlots: e.WORKER_LOG_STREAM_SPARE_SLOTS,
      flushIntervalMs: e.WORKER_LOG_FLUSH_INTERVAL_MS,
      // The poller's read size: a log is cut into the same chunks whichever reads it.
      maxChunkBytes: DEFAULT_LOG_CHUNK_BYTES,
      maxBufferedBytes: 4 * DEFAULT_LOG_CHUNK_BYTES,
      retryAfterMs: Math.max(10_000, 5 * e.WORKER_POLL_INTERVAL_MS),
    },
    concurrency: e.WORKER_CONCURRENCY,
    dbPoolSize: e.WORKER_DB_POOL_SIZE,
    transportMaxAttempts: e.WORKER_TRANSPORT_MAX_ATTEMPTS,
    backoffBaseMs: e.WORKER_BACKOFF_BASE_MS,
    backoffMaxMs: e.WORKER_BACKOFF_MAX_MS,
    hostUnreachableHoldMs: e.WORKER_HOST_UNREACHABLE_HOLD_MS,
    holdProbeIntervalMs: e.WORKER_HOLD_PROBE_INTERVAL_MS,
    ssh: {
      maxConnectionsPerTarget: e.SSH_MAX_CONNECTIONS_PER_TARGET,
      maxChannelsPerConnection: e.SSH_MAX_CHANNELS_PER_CONNECTION,
    },
    maxArtifactBytes: e.WORKER_MAX_ARTIFACT_BYTES,
    wallTimeGraceSeconds: e.WORKER_WALL_TIME_GRACE_SECONDS,
    postprocess: {
      concurrency: e.WORKER_POSTPROCESS_CONCURRENCY,
      timeoutMs: e.WORKER_POSTPROCESS_TIMEOUT_MS,
      maxHeapMb: e.WORKER_POSTPROCESS_MAX_HEAP_MB,
    },
    smtp: { host: e.SMTP_HOST, port: e.SMTP_PORT, secure: false, auth: undefined, from: e.MAIL_FROM },
    logLevel: e.LOG_LEVEL,
  };
}
