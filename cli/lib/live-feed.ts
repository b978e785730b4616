/**
 * Following a run over the live feed (socket.io at `/api/live`, contract in shared/schemas/live.ts):
 * join the run's room with the last sequence number written, write the chunks the server replays and then
 * sends live, answer `run:paused` with `run:resume`, and stop at a final `run:state`, after taking any
 * chunk still stored but not yet received from the HTTP log. Chunks pass through the same
 * {@link ChunkWriter} as the HTTP follower's, so the caller can switch to HTTP at any point.
 */
import { io, type Socket } from "socket.io-client";
import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "../../shared/schemas/common";
import {
  LIVE_EVENTS,
  LIVE_PATH,
  type LiveJoinRun,
  liveAckSchema,
  liveRunPausedSchema,
  liveRunStateSchema,
} from "../../shared/schemas/live";
import type { RunState } from "../../shared/schemas/runs";
import { CliError } from "../errors";
import { API_FAILURE_EXIT_CODE, type ApiClient, TOKEN_REFUSED_MESSAGE } from "./api-client";
import { type ChunkWriter, drainStoredLog, isFinalState, readRunState, SerialQueue } from "./log-follow";

/** How long the first connection and each join may take before the feed is given up for HTTP. */
const CONNECT_TIMEOUT_MS = 5_000;
/** Reconnection attempts after a lost connection before the feed is given up for HTTP. */
const RECONNECTION_ATTEMPTS = 5;
/**
 * While the feed is quiet the run's state is also read over HTTP this often, so a final state is noticed
 * even if its event never arrives.
 */
const STATE_CHECK_INTERVAL_MS = 15_000;

/** Join refusals that mean the token no longer works (it was revoked or expired after the first request). */
const TOKEN_REFUSED_CODES = new Set(["invalid_token", "unauthenticated", "unauthorized"]);

/** Bytes of one chunk as socket.io delivers them in Node (Buffer) or a browser (ArrayBuffer). */
const chunkDataSchema = z.custom<Uint8Array | ArrayBuffer>(
  (value) => value instanceof Uint8Array || value instanceof ArrayBuffer,
  { message: "data must be binary" },
);
const liveLogChunkSchema = z.object({
  runId: uuidSchema,
  seq: z.number().int().min(1),
  offsetBytes: z.number().int().min(0),
  data: chunkDataSchema,
  at: isoDateTimeSchema,
});

function toBuffer(data: Uint8Array | ArrayBuffer): Buffer {
  if (data instanceof ArrayBuffer) return Buffer.from(data);
  return Buffer.from(data.buffer, data.byteOffset, data.byteLength);
}

/** `unavailable`: the feed could not be used (not offered, refused, lost); follow over HTTP instead. */
export type LiveFeedOutcome = { kind: "final"; state: RunState } | { kind: "unavailable"; reason: string };

/**
 * Follows the run over the live feed until it reaches a final state or the feed becomes unusable.
 *
 * @param client - API client (its base URL and token are used for the feed too)
 * @param runId - the run
 * @param writer - where chunks go; its last seq is where joins start
 * @param signal - aborts the following (stdout closed); the promise then resolves as unavailable
 * @throws CliError when the server refuses the join itself (no such run, no access)
 */
export function followLiveFeed(
  client: ApiClient,
  runId: string,
  writer: ChunkWriter,
  signal?: AbortSignal,
): Promise<LiveFeedOutcome> {
  return new Promise((resolve, reject) => {
    const queue = new SerialQueue();
    let settled = false;
    let joinedOnce = false;
    let stateTimer: NodeJS.Timeout | undefined;
    const socket: Socket = io(client.config.baseUrl, {
      path: LIVE_PATH,
      auth: { token: client.config.token },
      timeout: CONNECT_TIMEOUT_MS,
      reconnectionAttempts: RECONNECTION_ATTEMPTS,
      reconnectionDelay: 500,
      reconnectionDelayMax: 2_000,
    });

    function settle(outcome: LiveFeedOutcome | Error) {
      if (settled) return;
      settled = true;
      clearInterval(stateTimer);
      signal?.removeEventListener("abort", onAbort);
      socket.removeAllListeners();
      socket.io.removeAllListeners();
      socket.close();
      if (outcome instanceof Error) reject(outcome);
      else resolve(outcome);
    }
    const fail = (error: unknown) => settle(error instanceof Error ? error : new Error(String(error)));
    const onAbort = () => settle({ kind: "unavailable", reason: "stopped" });
    signal?.addEventListener("abort", onAbort, { once: true });

    /** Final state seen: take whatever is stored but not yet written, then stop. Runs inside the queue. */
    async function finishInQueue(state: RunState) {
      if (settled) return;
      await drainStoredLog(client, runId, writer);
      settle({ kind: "final", state });
    }
    const finish = (state: RunState) => queue.run(() => finishInQueue(state));

    const checkState = () =>
      queue.run(async () => {
        if (settled) return;
        const state = await readRunState(client, runId);
        // Not `finish`: queueing behind this very task would wait for itself.
        if (isFinalState(state)) await finishInQueue(state);
      });

    socket.on("connect", () => {
      const join: LiveJoinRun = { runId, afterSeq: writer.lastSeq };
      socket
        .timeout(CONNECT_TIMEOUT_MS)
        .emit(LIVE_EVENTS.joinRun, join, (timeout: Error | null, raw: unknown) => {
          if (settled) return;
          if (timeout) return settle({ kind: "unavailable", reason: "the server did not answer the join" });
          const ack = liveAckSchema.safeParse(raw);
          if (!ack.success)
            return settle({ kind: "unavailable", reason: "the join's answer has an unexpected shape" });
          if (!ack.data.ok) {
            const { code, message } = ack.data.error;
            if (TOKEN_REFUSED_CODES.has(code)) {
              return fail(new CliError(TOKEN_REFUSED_MESSAGE, API_FAILURE_EXIT_CODE));
            }
            return fail(new CliError(message, API_FAILURE_EXIT_CODE));
          }
          // Read the state after the join: a run that finished before it sends no state event.
          checkState().catch(fail);
          if (!joinedOnce) {
            joinedOnce = true;
            stateTimer = setInterval(() => checkState().catch(fail), STATE_CHECK_INTERVAL_MS);
          }
        });
    });

    socket.on("connect_error", (error: Error) => {
      // Before the first join the feed is simply not there (an older server, a proxy without WebSocket
      // or long-polling, a refused handshake): HTTP follows instead. Later, socket.io reconnects by itself.
      if (!joinedOnce || !socket.active) settle({ kind: "unavailable", reason: error.message });
    });
    socket.io.on("reconnect_failed", () =>
      settle({ kind: "unavailable", reason: "the connection was lost" }),
    );

    socket.on(LIVE_EVENTS.log, (raw: unknown, ack?: unknown) => {
      const chunk = liveLogChunkSchema.safeParse(raw);
      if (!chunk.success || chunk.data.runId !== runId) return;
      const { seq, data } = chunk.data;
      queue
        .run(async () => {
          if (settled) return;
          // A gap in the numbers (a chunk the feed did not deliver) is filled from the stored log first.
          if (seq > writer.lastSeq + 1) await drainStoredLog(client, runId, writer, seq - 1);
          await writer.accept({ seq, data: toBuffer(data) });
          // Acknowledged once stdout took the bytes: the server's send budget then follows our reader.
          if (typeof ack === "function") ack();
        })
        .catch(fail);
    });

    socket.on(LIVE_EVENTS.state, (raw: unknown) => {
      const event = liveRunStateSchema.safeParse(raw);
      if (!event.success || event.data.runId !== runId) return;
      if (isFinalState(event.data.state)) finish(event.data.state).catch(fail);
    });

    socket.on(LIVE_EVENTS.paused, (raw: unknown) => {
      const event = liveRunPausedSchema.safeParse(raw);
      if (!event.success || event.data.runId !== runId) return;
      // Ask for the rest once every chunk received so far is written.
      queue
        .run(async () => {
          if (!settled) socket.emit(LIVE_EVENTS.resumeRun, { runId, afterSeq: writer.lastSeq });
        })
        .catch(fail);
    });
  });
}
