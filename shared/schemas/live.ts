/**
 * The live run feed over socket.io (path `/api/live`). A client joins a run's room with the last log
 * sequence number it holds and receives every stored chunk after it, then live chunks, in order, with no
 * gap and no duplicate; state changes, timings and progress follow as they happen. A group room carries
 * run summaries for the runs list. Joining checks the same permission as reading the run (or the group's
 * runs). The handshake uses the signed-in session cookie or an API token (`auth: { token }`), and the
 * server checks the Origin of browser connections.
 *
 * Log bytes travel as binary (socket.io sends Buffers/ArrayBuffers as attachments): exactly the bytes the
 * job wrote, including invalid UTF-8, carriage returns and ANSI colour.
 */
import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { runProgressSchema, runStateSchema, runSummarySchema, runTimingSchema } from "./runs";

export const LIVE_PATH = "/api/live";

/** Client → server events and their payloads (validated by the server with these schemas). */
export const liveJoinRunSchema = z.strictObject({
  runId: uuidSchema,
  /** The last log sequence number the client holds; 0 for none. */
  afterSeq: z.int().min(0).default(0),
  /** Whether to send the run's log; false: state and progress only (a page that shows no log yet). */
  log: z.boolean().default(true),
});
export type LiveJoinRun = z.input<typeof liveJoinRunSchema>;

export const liveLeaveRunSchema = z.strictObject({ runId: uuidSchema });
export const liveJoinGroupSchema = z.strictObject({ groupId: uuidSchema });
/** A client that fell behind (or paused) asks to go on from its last sequence number. */
export const liveResumeRunSchema = liveJoinRunSchema;

/** Acknowledgement of a join: ok, or an error with the same codes as the HTTP API (not_found, forbidden…). */
export const liveAckSchema = z.union([
  z.object({ ok: z.literal(true) }),
  z.object({ ok: z.literal(false), error: z.object({ code: z.string(), message: z.string() }) }),
]);
export type LiveAck = z.infer<typeof liveAckSchema>;

/** Server → client: one stored log chunk of a run (sent in `seq` order per run, each once). */
export type LiveLogChunk = {
  runId: string;
  seq: number;
  offsetBytes: number;
  /** The chunk's bytes as stored (Buffer on the server, ArrayBuffer in a browser). */
  data: Uint8Array | ArrayBuffer;
  at: string;
};

/** Server → client: the run's state changed (a run_events row). */
export const liveRunStateSchema = z.object({
  runId: uuidSchema,
  state: runStateSchema,
  message: z.string().nullable(),
  at: isoDateTimeSchema,
});
export type LiveRunState = z.infer<typeof liveRunStateSchema>;

/** Server → client: timings and progress as the poller stored them with a chunk. */
export const liveRunProgressSchema = z.object({
  runId: uuidSchema,
  progress: runProgressSchema.nullable(),
  timings: z.array(runTimingSchema),
});
export type LiveRunProgress = z.infer<typeof liveRunProgressSchema>;

/** Server → client (group room): a run of the group changed; its summary as the runs list shows it. */
export const liveGroupRunSchema = z.object({ groupId: uuidSchema, run: runSummarySchema });
export type LiveGroupRun = z.infer<typeof liveGroupRunSchema>;

/**
 * Server → client: the server stopped sending live chunks to this socket because it fell behind (more
 * than its send budget unacknowledged); the client asks `run:resume` with its last seq when it is ready,
 * and gets the rest from the stored log.
 */
export const liveRunPausedSchema = z.object({ runId: uuidSchema, lastSentSeq: z.int().min(0) });

export const LIVE_EVENTS = {
  joinRun: "run:join",
  leaveRun: "run:leave",
  resumeRun: "run:resume",
  joinGroup: "group:join",
  log: "run:log",
  state: "run:state",
  progress: "run:progress",
  paused: "run:paused",
  groupRun: "group:run",
} as const;
