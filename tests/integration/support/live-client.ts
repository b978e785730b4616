/**
 * The live run feed as a client sees it: socket.io-client at /api/live with an API token or a session
 * cookie (and, like a browser, an Origin), a recorder of what one run's feed delivered, and sessions
 * written straight into the session store for the cookie path.
 */
import { createHmac, randomBytes } from "node:crypto";
import { io, type Socket } from "socket.io-client";
import { SESSION_COOKIE } from "../../../server/auth/session";
import type { Database } from "../../../server/db/client";
import { sessions } from "../../../server/db/schema";
import {
  LIVE_EVENTS,
  LIVE_PATH,
  type LiveAck,
  type LiveRunProgress,
  type LiveRunState,
  liveRunProgressSchema,
  liveRunStateSchema,
} from "../../../shared/schemas/live";
import { waitFor } from "./wait-for";

export type LiveConnectOptions = {
  token?: string;
  /** A `Cookie` header, e.g. from `sessionCookieFor`. */
  cookie?: string;
  /** The Origin header a browser would send; none unless given. */
  origin?: string;
};

/** A refused connection, with the HTTP status it stands for (401 credential, 403 Origin). */
export class LiveRefusal extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/** The status a `connect_error` stands for: the handshake's own HTTP status, or 401 for a refused credential. */
function refusalOf(error: Error & { data?: { code?: string }; description?: unknown }): LiveRefusal {
  if (error.data?.code) return new LiveRefusal(401, error.data.code, error.message);
  const description = error.description;
  const text =
    typeof description === "number" ? String(description) : String((description as Error)?.message);
  const status = Number(/\b([45]\d\d)\b/.exec(text)?.[1] ?? 0);
  return new LiveRefusal(status, "transport", `${error.message}: ${text}`);
}

/** Connects without reconnecting by itself (tests reconnect on purpose); rejects with a LiveRefusal. */
export function connectLive(baseUrl: string, options: LiveConnectOptions = {}): Promise<Socket> {
  const extraHeaders: Record<string, string> = {};
  if (options.cookie) extraHeaders.cookie = options.cookie;
  if (options.origin) extraHeaders.origin = options.origin;
  const socket = io(baseUrl, {
    path: LIVE_PATH,
    auth: options.token ? { token: options.token } : {},
    extraHeaders,
    reconnection: false,
    timeout: 10_000,
    forceNew: true,
  });
  return new Promise((resolve, reject) => {
    socket.once("connect", () => resolve(socket));
    socket.once("connect_error", (error) => {
      socket.close();
      reject(refusalOf(error));
    });
  });
}

export async function emitWithAck(socket: Socket, event: string, payload: unknown): Promise<LiveAck> {
  return (await socket.timeout(10_000).emitWithAck(event, payload)) as LiveAck;
}

export type ReceivedChunk = { seq: number; offsetBytes: number; data: Buffer };

/**
 * Everything one run's feed delivered, across the sockets it is attached to in turn. It acknowledges
 * each chunk unless told not to (a client that never does gets paused once per send budget).
 */
export class RunRecorder {
  readonly chunks: ReceivedChunk[] = [];
  readonly states: LiveRunState[] = [];
  readonly progress: LiveRunProgress[] = [];
  readonly paused: { runId: string; lastSentSeq: number }[] = [];

  constructor(
    readonly runId: string,
    private readonly options: { acknowledge?: boolean } = {},
  ) {}

  /** Records what `socket` sends for the run from now on. */
  attach(socket: Socket): this {
    socket.on(
      LIVE_EVENTS.log,
      (chunk: { runId: string; seq: number; offsetBytes: number; data: Buffer }, ack) => {
        if (chunk.runId !== this.runId) return;
        this.chunks.push({ seq: chunk.seq, offsetBytes: chunk.offsetBytes, data: Buffer.from(chunk.data) });
        if (this.options.acknowledge !== false && typeof ack === "function") ack();
      },
    );
    socket.on(LIVE_EVENTS.state, (raw: unknown) => {
      const event = liveRunStateSchema.parse(raw);
      if (event.runId === this.runId) this.states.push(event);
    });
    socket.on(LIVE_EVENTS.progress, (raw: unknown) => {
      const event = liveRunProgressSchema.parse(raw);
      if (event.runId === this.runId) this.progress.push(event);
    });
    socket.on(LIVE_EVENTS.paused, (event: { runId: string; lastSentSeq: number }) => {
      if (event.runId === this.runId) this.paused.push(event);
    });
    return this;
  }

  get lastSeq(): number {
    return this.chunks.at(-1)?.seq ?? 0;
  }

  seqs(): number[] {
    return this.chunks.map((chunk) => chunk.seq);
  }

  bytes(): Buffer {
    return Buffer.concat(this.chunks.map((chunk) => chunk.data));
  }

  /** Waits until the feed delivered chunk `seq` (or later). */
  untilSeq(seq: number, timeoutMs = 20_000) {
    return waitFor(
      `chunk ${seq} of run ${this.runId}`,
      () => this.lastSeq,
      (last) => last >= seq,
      {
        timeoutMs,
        intervalMs: 20,
      },
    );
  }

  untilState(state: string, timeoutMs = 25_000) {
    return waitFor(
      `state ${state} of run ${this.runId} over the live feed`,
      () => this.states.map((event) => event.state),
      (seen) => seen.includes(state as never),
      { timeoutMs, intervalMs: 20 },
    );
  }
}

/** The signature express-session puts on its cookie (cookie-signature: HMAC-SHA256, base64 without padding). */
function signSessionId(sid: string, secret: string): string {
  const mac = createHmac("sha256", secret).update(sid).digest("base64").replace(/=+$/, "");
  return `s:${sid}.${mac}`;
}

/**
 * A signed-in browser session of `userId`, stored as the server's session middleware stores one after
 * sign-in (passport keeps the user id under `passport.user`); returns its Cookie header and session id.
 */
export async function sessionCookieFor(db: Database, userId: string, secret: string) {
  const sid = randomBytes(18).toString("base64url");
  const expires = new Date(Date.now() + 3_600_000);
  await db.insert(sessions).values({
    sid,
    sess: {
      cookie: {
        originalMaxAge: 3_600_000,
        expires: expires.toISOString(),
        httpOnly: true,
        path: "/",
        sameSite: "lax",
      },
      passport: { user: userId },
    },
    expire: expires,
  });
  return { sid, cookie: `${SESSION_COOKIE}=${encodeURIComponent(signSessionId(sid, secret))}` };
}
