/**
 * `sigmaflow runs watch`: a run's log bytes on stdout exactly as the job wrote them (no decoding), from
 * the start and then live, and an exit code that says how the run ended. The live feed is preferred; when
 * it cannot be used the log is followed over HTTP from the last chunk written.
 */
import type { Writable } from "node:stream";
import type { RunState } from "../../shared/schemas/runs";
import type { ApiClient } from "./api-client";
import { followLiveFeed } from "./live-feed";
import { ChunkWriter, followOverHttp } from "./log-follow";

/** Exit codes of `watch` by the run's final state. */
export const WATCH_EXIT_CODES = { done: 0, failed: 1, cancelled: 3 } as const;

/** How often the stored log is read when it is followed over HTTP. */
export const HTTP_POLL_INTERVAL_MS = 1_000;

/** stdout was closed by its reader (`… | head`): stop quietly. */
export class OutputClosedError extends Error {
  constructor() {
    super("stdout was closed");
    this.name = "OutputClosedError";
  }
}

function isClosedPipe(error: unknown): boolean {
  const code = (error as NodeJS.ErrnoException | null)?.code;
  return code === "EPIPE" || code === "ERR_STREAM_DESTROYED" || code === "ERR_STREAM_WRITE_AFTER_END";
}

/**
 * Byte output to a stream: each write resolves once the stream took the bytes (so a slow reader slows the
 * follower instead of filling memory) and rejects with OutputClosedError when the reader went away.
 */
export function streamOutput(stream: Writable, onClosed: () => void) {
  let closed = false;
  const close = () => {
    if (closed) return;
    closed = true;
    onClosed();
  };
  // Node ignores SIGPIPE; a closed pipe shows as EPIPE on the stream, which must not crash the process.
  stream.on("error", (error) => {
    if (isClosedPipe(error)) close();
  });
  return (data: Buffer): Promise<void> =>
    new Promise((resolve, reject) => {
      if (closed) return reject(new OutputClosedError());
      stream.write(data, (error) => {
        if (!error) return resolve();
        if (isClosedPipe(error)) {
          close();
          return reject(new OutputClosedError());
        }
        reject(error);
      });
    });
}

export type WatchResult =
  | { kind: "final"; state: RunState; via: "live" | "http" }
  | { kind: "output-closed" };

/**
 * Follows run `runId` until it is final, writing its log to `out`.
 *
 * @param options.live - try the live feed first (default true)
 * @param options.pollIntervalMs - HTTP poll interval (default {@link HTTP_POLL_INTERVAL_MS})
 * @param options.onFallback - told why the live feed was not used (for a note on stderr)
 */
export async function watchRun(
  client: ApiClient,
  runId: string,
  out: Writable,
  options: { live?: boolean; pollIntervalMs?: number; onFallback?: (reason: string) => void } = {},
): Promise<WatchResult> {
  const stop = new AbortController();
  const writer = new ChunkWriter(streamOutput(out, () => stop.abort()));
  try {
    if (options.live !== false) {
      const live = await followLiveFeed(client, runId, writer, stop.signal);
      if (live.kind === "final") return { kind: "final", state: live.state, via: "live" };
      if (stop.signal.aborted) return { kind: "output-closed" };
      options.onFallback?.(live.reason);
    }
    const state = await followOverHttp(client, runId, writer, {
      pollIntervalMs: options.pollIntervalMs ?? HTTP_POLL_INTERVAL_MS,
      signal: stop.signal,
    });
    return state === null ? { kind: "output-closed" } : { kind: "final", state, via: "http" };
  } catch (error) {
    if (error instanceof OutputClosedError || stop.signal.aborted) return { kind: "output-closed" };
    throw error;
  }
}
