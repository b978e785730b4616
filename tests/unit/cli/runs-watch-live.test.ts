/**
 * `sigmaflow runs watch` on the live feed (a socket.io server speaking the contract of
 * shared/schemas/live.ts beside the fake HTTP API): the join carries the token and the last sequence
 * number written, each chunk is acknowledged, a pause is answered with `run:resume` from the last chunk,
 * a lost connection is joined again from there, a repeated chunk is dropped, a gap is filled from the
 * stored log, and a final `run:state` ends the watch after the stored rest is taken.
 */
import { Writable } from "node:stream";
import { Server, type Socket } from "socket.io";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiConfigFromEnv, createApiClient } from "../../../cli/lib/api-client";
import { watchRun } from "../../../cli/lib/run-watch";
import { LIVE_EVENTS, LIVE_PATH } from "../../../shared/schemas/live";
import { type FakeApi, logPage, RUN_ID, runDetail, startFakeApi, TOKEN } from "./runs-fake-api";

let api: FakeApi;
let io: Server;
beforeAll(async () => {
  api = await startFakeApi();
  io = new Server(api.server, { path: LIVE_PATH });
});
afterAll(async () => {
  await io.close();
  await api.close();
});

const AT = "2026-12-05T01:03:00.000Z";

/** The stored log: 12 chunks, with UTF-8 split across chunks and bytes that are not UTF-8 at all. */
const STORED = Array.from({ length: 12 }, (_, i) =>
  i % 3 === 1 ? Buffer.from([0xe2, 0x82, 0xac, 0xff, 0x0a, 0xce]) : Buffer.from(`\u03b1 line ${i}\r\n`),
).map((data, i, all) => ({
  seq: i + 1,
  offsetBytes: all.slice(0, i).reduce((sum, d) => sum + d.length, 0),
  data,
}));

function nextEvent<T>(socket: Socket, event: string): Promise<T> {
  return new Promise((resolve) => socket.once(event, (payload: T) => resolve(payload)));
}

describe("runs watch on the live feed", { timeout: 30_000 }, () => {
  it("writes every chunk once across a pause, a lost connection, a repeat and a gap, and ends at the final state", async () => {
    api.routes.set(`GET /api/runs/${RUN_ID}`, () => ({ body: runDetail({ state: "running" }) }));
    // The stored log over HTTP, for the gap and the rest after the final state.
    api.routes.set(`GET /api/runs/${RUN_ID}/log`, (url) => {
      const afterSeq = Number(url.searchParams.get("afterSeq"));
      const page = STORED.filter((c) => c.seq > afterSeq);
      return { body: logPage(page, page.at(-1)?.seq ?? afterSeq, true) };
    });

    const joins: { afterSeq: number; token: unknown }[] = [];
    const resumes: number[] = [];
    let acks = 0;
    const send = (socket: Socket, seq: number) =>
      socket.emit(
        LIVE_EVENTS.log,
        {
          runId: RUN_ID,
          seq,
          offsetBytes: STORED[seq - 1]!.offsetBytes,
          data: STORED[seq - 1]!.data,
          at: AT,
        },
        () => {
          acks += 1;
        },
      );

    io.on("connection", (socket) => {
      socket.on(
        LIVE_EVENTS.joinRun,
        async (join: { runId: string; afterSeq: number }, ack: (a: unknown) => void) => {
          joins.push({ afterSeq: join.afterSeq, token: socket.handshake.auth.token });
          expect(join.runId).toBe(RUN_ID);
          ack({ ok: true });
          if (joins.length === 1) {
            // Chunks 1–3, then a pause: the client resumes from the last chunk it wrote.
            for (const seq of [1, 2, 3]) send(socket, seq);
            socket.emit(LIVE_EVENTS.paused, { runId: RUN_ID, lastSentSeq: 3 });
            const resume = await nextEvent<{ runId: string; afterSeq: number }>(
              socket,
              LIVE_EVENTS.resumeRun,
            );
            resumes.push(resume.afterSeq);
            for (const seq of [4, 5]) send(socket, seq);
            // Wait until the client has taken chunk 5, then drop the connection under it.
            while (acks < 5) await new Promise((resolve) => setTimeout(resolve, 5));
            socket.conn.close();
            return;
          }
          // Joined again from what it holds: repeat one chunk, skip 7 and 8 (the client fills them over
          // HTTP), then the rest and the final state.
          for (const seq of [join.afterSeq, 6, 9, 10, 11]) send(socket, seq);
          socket.emit(LIVE_EVENTS.state, {
            runId: RUN_ID,
            state: "cancelled",
            message: "cancelled by Researcher",
            at: AT,
          });
        },
      );
    });

    const parts: Buffer[] = [];
    const out = new Writable({
      write(chunk: Buffer, _encoding, callback) {
        parts.push(Buffer.from(chunk));
        callback();
      },
    });
    const client = createApiClient(apiConfigFromEnv({ SIGMAFLOW_URL: api.url, SIGMAFLOW_TOKEN: TOKEN }));
    const result = await watchRun(client, RUN_ID, out, { pollIntervalMs: 10 });

    expect(result).toEqual({ kind: "final", state: "cancelled", via: "live" });
    expect(joins).toEqual([
      { afterSeq: 0, token: TOKEN },
      { afterSeq: 5, token: TOKEN },
    ]);
    expect(resumes).toEqual([3]);
    // Chunk 12 was never sent live: it came with the stored rest after the final state.
    expect(Buffer.concat(parts).equals(Buffer.concat(STORED.map((c) => c.data)))).toBe(true);
    expect(parts.length).toBe(STORED.length);
  });

  it("replays a run that ended before the join and stops though no state event comes", async () => {
    io.removeAllListeners("connection");
    api.routes.set(`GET /api/runs/${RUN_ID}`, () => ({ body: runDetail({ state: "done" }) }));
    api.routes.set(`GET /api/runs/${RUN_ID}/log`, (url) => {
      const afterSeq = Number(url.searchParams.get("afterSeq"));
      const page = STORED.filter((c) => c.seq > afterSeq);
      return { body: logPage(page, page.at(-1)?.seq ?? afterSeq, true) };
    });
    io.on("connection", (socket) => {
      socket.on(LIVE_EVENTS.joinRun, (_join: unknown, ack: (a: unknown) => void) => {
        ack({ ok: true });
        for (const chunk of STORED.slice(0, 4)) {
          socket.emit(LIVE_EVENTS.log, { runId: RUN_ID, ...chunk, at: AT }, () => {});
        }
      });
    });
    const parts: Buffer[] = [];
    const out = new Writable({
      write(chunk: Buffer, _encoding, callback) {
        parts.push(Buffer.from(chunk));
        callback();
      },
    });
    const client = createApiClient(apiConfigFromEnv({ SIGMAFLOW_URL: api.url, SIGMAFLOW_TOKEN: TOKEN }));
    const result = await watchRun(client, RUN_ID, out, { pollIntervalMs: 10 });
    expect(result).toEqual({ kind: "final", state: "done", via: "live" });
    expect(Buffer.concat(parts).equals(Buffer.concat(STORED.map((c) => c.data)))).toBe(true);
  });
});
