/**
 * Reads and derives a run's results in a child process, so a large or pathological result file (written
 * by a user-supplied code) never blocks the worker's event loop, which polls, stages and collects every
 * group's runs, and a memory blow-up ends the child, not the worker.
 *
 * Why a process and not a `node:worker_threads` thread: a thread's `resourceLimits` are enforced by a
 * near-heap-limit callback that grants 16 MB of leeway and asks the thread to stop; one allocation larger
 * than that (a file decoded to a string, a split) reaches V8's fatal out-of-memory handler, which aborts
 * the whole process, worker included (seen on Node 20 with a 47 MB table and a 32 MB heap limit). A
 * child's heap limit (`--max-old-space-size`) aborts only the child.
 *
 * Each derivation gets a fresh child (nothing of one run's files survives into the next) with a heap
 * limit and a wall-clock limit counted from the moment the request is handed over (start-up, loading the
 * modules, is bounded separately). At most `maxChildren` derive at once; further derivations wait their
 * turn, and waiting does not count against the limit. The child gets a minimal environment: no database
 * address, no secrets.
 *
 * Outcomes: the derivation; {@link DerivationRefusedError} (a reader or the science core refused the
 * files: the reason is for the run's results message); {@link DerivationLimitError} (too slow or too
 * large: the same); {@link DerivationProcessError} (the child could not be started or died otherwise:
 * not the files' fault, so the step is retried).
 */
import { type ChildProcess, fork } from "node:child_process";
import { fileURLToPath } from "node:url";
import type { RunAnalysis } from "../../shared/schemas/results";
import {
  CHUNK_BYTES,
  type DeriveMessage,
  type DeriveReply,
  deriveReplySchema,
} from "./derive-child-protocol";
import type { Derivation } from "./derive-common";
import type { ResultFile } from "./derive-run-results";

export interface DerivationLimits {
  /** Wall-clock limit of one derivation, from hand-over to answer. */
  timeoutMs: number;
  /** V8 old-generation heap of the child (`--max-old-space-size`). */
  maxHeapMb: number;
}

/** What a derivation cost in its child process. */
export interface DerivationUsage {
  /** Reading and deriving, in the child, ms. */
  derivationMs: number;
  /** The child's peak resident memory (start-up included), MB. */
  peakRssMb: number;
}

export interface IsolatedDerivation {
  derivation: Derivation;
  usage: DerivationUsage;
}

/** The derivation took too long or needed too much memory; `message` completes "results could not be derived: ". */
export class DerivationLimitError extends Error {
  override name = "DerivationLimitError";
}

/** A reader or the science core refused the files; `message` is theirs. */
export class DerivationRefusedError extends Error {
  override name = "DerivationRefusedError";
  constructor(
    message: string,
    /** Name of the error class in the child (ResultReadError, ScienceInputError, …). */
    readonly originalName: string,
  ) {
    super(message);
  }
}

/** The child could not start or died for a reason that is not the files'. */
export class DerivationProcessError extends Error {
  override name = "DerivationProcessError";
}

const BOOTSTRAP = fileURLToPath(new URL("./derive-child-bootstrap.mjs", import.meta.url));
/** Start-up (Node, tsx and the science modules) on a busy machine; not the files' fault if exceeded. */
const STARTUP_TIMEOUT_MS = 60_000;
/** The tail of the child's stderr kept to tell an out-of-memory abort from other deaths. */
const STDERR_TAIL_CHARS = 4096;
/** What V8 prints when a heap limit is reached. */
const OUT_OF_MEMORY = /heap out of memory|Reached heap limit|Allocation failed/i;

/** "60 s", "0.04 s". */
export const formatSeconds = (ms: number) => `${Number((ms / 1000).toPrecision(3))} s`;

/** Derivations in child processes, at most `maxChildren` at once. */
export class DerivationPool {
  #running = 0;
  readonly #waiting: (() => void)[] = [];

  constructor(
    readonly maxChildren: number,
    readonly limits: DerivationLimits,
  ) {
    if (!(Number.isInteger(maxChildren) && maxChildren >= 1)) {
      throw new Error("maxChildren must be a whole number ≥ 1");
    }
  }

  /** Derivations running in children now. */
  get running(): number {
    return this.#running;
  }

  /**
   * Reads and derives `files` in a fresh child process once a slot is free.
   *
   * @throws DerivationRefusedError, DerivationLimitError, DerivationProcessError (see the module comment)
   */
  async derive(
    files: readonly ResultFile[],
    analysis: RunAnalysis,
    context: { charge: number | null },
  ): Promise<IsolatedDerivation> {
    await this.#acquire();
    try {
      return await deriveIsolated(files, analysis, context, this.limits);
    } finally {
      this.#release();
    }
  }

  async #acquire(): Promise<void> {
    if (this.#running < this.maxChildren) {
      this.#running += 1;
      return;
    }
    // The releasing derivation hands its slot over directly, so #running stays counted.
    await new Promise<void>((resolve) => this.#waiting.push(resolve));
  }

  #release(): void {
    const next = this.#waiting.shift();
    if (next) next();
    else this.#running -= 1;
  }
}

/** The environment of the child: enough for Node and tsx's cache, nothing of the worker's settings. */
function childEnvironment(): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = { NODE_ENV: process.env.NODE_ENV ?? "production" };
  for (const name of ["PATH", "TMPDIR", "TMP", "TEMP", "HOME", "TZ"]) {
    if (process.env[name] !== undefined) env[name] = process.env[name];
  }
  return env;
}

/** One derivation in one fresh child; see {@link DerivationPool.derive}. */
export function deriveIsolated(
  files: readonly ResultFile[],
  analysis: RunAnalysis,
  context: { charge: number | null },
  limits: DerivationLimits,
): Promise<IsolatedDerivation> {
  return new Promise<IsolatedDerivation>((resolve, reject) => {
    let child: ChildProcess;
    try {
      child = fork(BOOTSTRAP, [], {
        // Not the worker's options: the bootstrap registers tsx itself (see derive-child-bootstrap.mjs).
        execArgv: [`--max-old-space-size=${limits.maxHeapMb}`],
        serialization: "advanced",
        stdio: ["ignore", "ignore", "pipe", "ipc"],
        env: childEnvironment(),
      });
    } catch (error) {
      reject(
        new DerivationProcessError(`the derivation process could not start: ${(error as Error).message}`),
      );
      return;
    }
    let stderrTail = "";
    child.stderr?.setEncoding("utf8");
    child.stderr?.on("data", (chunk: string) => {
      stderrTail = (stderrTail + chunk).slice(-STDERR_TAIL_CHARS);
    });
    let settled = false;
    let timer: NodeJS.Timeout | undefined;
    const finish = (outcome: { derived: IsolatedDerivation } | { error: Error }) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      if (child.exitCode === null && child.signalCode === null) child.kill("SIGKILL");
      if ("derived" in outcome) resolve(outcome.derived);
      else reject(outcome.error);
    };
    const startTimer = (ms: number, error: () => Error) => {
      clearTimeout(timer);
      timer = setTimeout(() => finish({ error: error() }), ms);
    };

    startTimer(
      STARTUP_TIMEOUT_MS,
      () =>
        new DerivationProcessError(
          `the derivation process did not start within ${formatSeconds(STARTUP_TIMEOUT_MS)}`,
        ),
    );
    child.on("message", (raw: unknown) => {
      const parsed = deriveReplySchema.safeParse(raw);
      if (!parsed.success) {
        finish({
          error: new DerivationProcessError("the derivation process sent a message Sigmaflow does not know"),
        });
        return;
      }
      const reply: DeriveReply = parsed.data;
      if (reply.kind === "ready") {
        startTimer(
          limits.timeoutMs,
          () => new DerivationLimitError(`deriving took longer than ${formatSeconds(limits.timeoutMs)}`),
        );
        handOver(child, files, analysis, context, () => settled).catch((error: Error) =>
          finish({
            error: new DerivationProcessError(`the files could not be handed over: ${error.message}`),
          }),
        );
      } else if (reply.kind === "derived") {
        finish({ derived: { derivation: reply.derivation, usage: reply.usage } });
      } else {
        finish({ error: new DerivationRefusedError(reply.message, reply.name) });
      }
    });
    child.on("error", (error) => {
      finish({ error: new DerivationProcessError(`the derivation process failed: ${error.message}`) });
    });
    // "close" comes after stderr has ended, so its tail is complete.
    child.on("close", (code, signal) => {
      if (OUT_OF_MEMORY.test(stderrTail)) {
        finish({
          error: new DerivationLimitError(
            `deriving needed more than the ${limits.maxHeapMb} MB of memory allowed`,
          ),
        });
        return;
      }
      const how = signal ? `signal ${signal}` : `code ${code}`;
      const said = stderrTail.trim().split("\n").slice(-3).join(" ").slice(0, 500);
      finish({
        error: new DerivationProcessError(
          `the derivation process ended (${how}) without an answer${said ? `: ${said}` : ""}`,
        ),
      });
    });
  });
}

/**
 * Sends the request, each file in pieces of at most CHUNK_BYTES (each send waits for the previous one, so
 * the event loop never serializes more than one piece at a time), and the end mark. Stops early once the
 * derivation is settled (killed for taking too long, say).
 */
async function handOver(
  child: ChildProcess,
  files: readonly ResultFile[],
  analysis: RunAnalysis,
  context: { charge: number | null },
  isSettled: () => boolean,
): Promise<void> {
  const send = (message: DeriveMessage) =>
    new Promise<void>((resolve, reject) => {
      child.send(message, (error) => (error ? reject(error) : resolve()));
    });
  await send({
    kind: "request",
    files: files.map((file) => ({
      stage: file.stage,
      fileName: file.fileName,
      reader: file.reader,
      byteLength: file.content.byteLength,
    })),
    analysis,
    context,
  });
  for (const [index, file] of files.entries()) {
    for (let offset = 0; offset < file.content.byteLength; offset += CHUNK_BYTES) {
      if (isSettled()) return;
      const bytes = file.content.subarray(offset, Math.min(offset + CHUNK_BYTES, file.content.byteLength));
      await send({ kind: "chunk", file: index, offset, bytes });
    }
  }
  if (!isSettled()) await send({ kind: "end" });
}
