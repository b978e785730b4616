/**
 * `sigmaflow runs watch` following the log over HTTP (the fake API offers no live feed, so the command
 * falls back to polling `GET /api/runs/:id/log?afterSeq=`): chunks arriving over several polls reach
 * stdout byte for byte, once each and in order; the exit code says how the run ended; a reader that goes
 * away (`| head`) ends the command quietly.
 */
import { type ChildProcess, spawn } from "node:child_process";
import { Writable } from "node:stream";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { apiConfigFromEnv, createApiClient } from "../../../cli/lib/api-client";
import { watchRun } from "../../../cli/lib/run-watch";
import { type FakeApi, logPage, RUN_ID, runDetail, startFakeApi, TOKEN } from "./runs-fake-api";

const root = fileURLToPath(new URL("../../..", import.meta.url));

let api: FakeApi;
beforeAll(async () => {
  api = await startFakeApi();
});
afterAll(() => api.close());
beforeEach(() => {
  api.routes.clear();
  api.requests.length = 0;
});

type StoredChunk = { seq: number; offsetBytes: number; data: Buffer };

/**
 * A run whose log grows: `appendAt[n]` are the chunks stored before the n-th log request is answered; the
 * run turns `finalState` once the last of them is stored. Answers honour `afterSeq` and `limit` but, as a
 * careless server might, repeat the chunk at `afterSeq` itself, which the follower must drop.
 */
/** A run whose log grows by `appendAt[i]` at the i-th log request; pages hold at most `pageCap` chunks. */
function growingRun(
  appendAt: Buffer[][],
  finalState: "done" | "failed" | "cancelled",
  options: { pageCap?: number } = {},
) {
  const stored: StoredChunk[] = [];
  let offsetBytes = 0;
  let requests = 0;
  let state = "running";
  api.routes.set(`GET /api/runs/${RUN_ID}`, () => ({ body: runDetail({ state }) }));
  api.routes.set(`GET /api/runs/${RUN_ID}/log`, (url) => {
    for (const data of appendAt[requests] ?? []) {
      stored.push({ seq: stored.length + 1, offsetBytes, data });
      offsetBytes += data.length;
    }
    requests += 1;
    if (requests >= appendAt.length) state = finalState;
    const afterSeq = Number(url.searchParams.get("afterSeq"));
    const limit = Math.min(
      Number(url.searchParams.get("limit")),
      options.pageCap ?? Number.POSITIVE_INFINITY,
    );
    const page = stored.filter((c) => c.seq >= afterSeq).slice(0, limit);
    const complete = state === finalState && (page.at(-1)?.seq ?? afterSeq) === stored.length;
    return { body: logPage(page, page.at(-1)?.seq ?? afterSeq, complete) };
  });
  return { stored, logRequests: () => requests };
}

function collector() {
  const parts: Buffer[] = [];
  const stream = new Writable({
    write(chunk: Buffer, _encoding, callback) {
      parts.push(Buffer.from(chunk));
      callback();
    },
  });
  return { stream, bytes: () => Buffer.concat(parts) };
}

// Multi-byte UTF-8 split across chunks, an invalid byte (0xff), a lone continuation byte (0x80), CR and an
// ANSI colour: the log is bytes, never text.
const PIECES = [
  [Buffer.from("start\n"), Buffer.from([0xce])],
  [],
  [Buffer.from([0xb1, 0x20, 0xff, 0x0a]), Buffer.from("\u001b[32mprogress 1/2\u001b[0m\r\n")],
  [],
  [Buffer.from([0x80, 0x0a]), Buffer.from("σ ≈ 3.1 Å²\n")],
];

describe("runs watch over HTTP", { timeout: 30_000 }, () => {
  it("writes chunks that arrive over several polls exactly once, byte for byte, and ends at the final state", async () => {
    const run = growingRun(PIECES, "failed");
    const out = collector();
    const client = createApiClient(apiConfigFromEnv({ SIGMAFLOW_URL: api.url, SIGMAFLOW_TOKEN: TOKEN }));
    const result = await watchRun(client, RUN_ID, out.stream, { pollIntervalMs: 10 });
    expect(result).toEqual({ kind: "final", state: "failed", via: "http" });
    expect(out.bytes().equals(Buffer.concat(run.stored.map((c) => c.data)))).toBe(true);
    expect(out.bytes().equals(Buffer.concat(PIECES.flat()))).toBe(true);
    expect(run.logRequests()).toBeGreaterThanOrEqual(PIECES.length);
    // The follower asks from the last chunk it wrote: afterSeq never goes back.
    const afterSeqs = api.requests
      .filter((r) => r.line.startsWith(`GET /api/runs/${RUN_ID}/log?`))
      .map((r) => Number(new URL(r.line.split(" ")[1]!, "http://x").searchParams.get("afterSeq")));
    expect(afterSeqs[0]).toBe(0);
    expect(afterSeqs).toEqual([...afterSeqs].sort((a, b) => a - b));
  });

  it("reads a log longer than one page in pages without waiting between them", async () => {
    const many = Array.from({ length: 1234 }, (_, i) => Buffer.from(`line ${i}\n`));
    const run = growingRun([many], "done");
    const out = collector();
    const client = createApiClient(apiConfigFromEnv({ SIGMAFLOW_URL: api.url, SIGMAFLOW_TOKEN: TOKEN }));
    // A poll interval this long would time the test out if pages waited for it.
    const result = await watchRun(client, RUN_ID, out.stream, { pollIntervalMs: 60_000 });
    expect(result).toEqual({ kind: "final", state: "done", via: "http" });
    expect(out.bytes().equals(Buffer.concat(run.stored.map((c) => c.data)))).toBe(true);
  });

  it("keeps reading at once when the server ends pages early (its size limit), not only after full pages", async () => {
    const many = Array.from({ length: 50 }, (_, i) => Buffer.from(`line ${i}\n`));
    const run = growingRun([many], "done", { pageCap: 7 });
    const out = collector();
    const client = createApiClient(apiConfigFromEnv({ SIGMAFLOW_URL: api.url, SIGMAFLOW_TOKEN: TOKEN }));
    // Pages of 7 chunks are far below the requested limit; waiting a poll interval after one would time out.
    const result = await watchRun(client, RUN_ID, out.stream, { pollIntervalMs: 60_000 });
    expect(result).toEqual({ kind: "final", state: "done", via: "http" });
    expect(out.bytes().equals(Buffer.concat(run.stored.map((c) => c.data)))).toBe(true);
  });
});

function sigmaflow(args: string[]): {
  child: ChildProcess;
  done: Promise<{ code: number | null; stdout: Buffer; stderr: string }>;
} {
  const child = spawn(process.execPath, ["bin/sigmaflow.mjs", ...args], {
    cwd: root,
    env: { ...process.env, SIGMAFLOW_URL: api.url, SIGMAFLOW_TOKEN: TOKEN },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const stdout: Buffer[] = [];
  let stderr = "";
  child.stdout!.on("data", (data: Buffer) => stdout.push(data));
  child.stderr!.on("data", (data: Buffer) => {
    stderr += data.toString("utf8");
  });
  const done = new Promise<{ code: number | null; stdout: Buffer; stderr: string }>((resolve) =>
    child.on("close", (code) => resolve({ code, stdout: Buffer.concat(stdout), stderr })),
  );
  return { child, done };
}

describe("sigmaflow runs watch as a command", { timeout: 60_000 }, () => {
  for (const [state, code] of [
    ["done", 0],
    ["failed", 1],
    ["cancelled", 3],
  ] as const) {
    it(`exits with ${code} when the run ends ${state}, its log on stdout byte for byte`, async () => {
      const run = growingRun(PIECES, state);
      const result = await sigmaflow(["runs", "watch", RUN_ID]).done;
      // The fake API has no live feed: the command says so once and follows over HTTP.
      expect(result.stderr).toMatch(
        /^sigmaflow runs watch: the live feed is not available \(.+\); following the stored log over HTTP instead\.\n$/,
      );
      expect(result.code).toBe(code);
      expect(result.stdout.equals(Buffer.concat(run.stored.map((c) => c.data)))).toBe(true);
    });
  }

  it("stops quietly with status 0 when its reader closes stdout (`| head`)", async () => {
    // A run that never ends, with a long log: the reader leaves after the first bytes.
    let seq = 0;
    api.routes.set(`GET /api/runs/${RUN_ID}`, () => ({ body: runDetail({ state: "running" }) }));
    api.routes.set(`GET /api/runs/${RUN_ID}/log`, (url) => {
      const afterSeq = Number(url.searchParams.get("afterSeq"));
      const page = Array.from({ length: 200 }, (_, i) => ({
        seq: afterSeq + i + 1,
        offsetBytes: 0,
        data: Buffer.from(`${"x".repeat(4000)} ${afterSeq + i}\n`),
      }));
      seq = afterSeq + 200;
      return { body: logPage(page, seq, false) };
    });
    const { child, done } = sigmaflow(["runs", "watch", "--poll", RUN_ID]);
    child.stdout!.once("data", () => child.stdout!.destroy());
    const result = await done;
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
  });

  it("names an unknown run before writing anything, with status 4", async () => {
    const result = await sigmaflow(["runs", "watch", RUN_ID]).done;
    expect(result.code).toBe(4);
    expect(result.stdout.length).toBe(0);
    expect(result.stderr).toBe(`sigmaflow runs: No route /api/runs/${RUN_ID}.\n`);
  });
});
