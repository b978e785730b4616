/**
 * The hostile log of support/hostile-log.ts (200 000 lines of multi-byte UTF-8 split across chunks,
 * 100 kB lines, carriage returns, ANSI colour, bytes that are not UTF-8) as the live feed delivers it:
 * a socket.io client that joins the run's room at /api/live while the job is still writing gets the chunks
 * stored so far replayed and the rest live, and `sigmaflow runs watch` (the command line as a child
 * process) prints them on stdout. Both must come to the job's log file on the host byte for byte (length
 * and sha256), with sequence numbers 1..N each once, and `watch` exits 0 for the run that ended done.
 * A client that leaves and comes back with its last sequence number is checked in live-feed.test.ts.
 */
import { spawn } from "node:child_process";
import { readFile } from "node:fs/promises";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { LIVE_EVENTS, type LiveAck, liveRunPausedSchema } from "../../shared/schemas/live";
import { runDirOnHost } from "./support/fault-helpers";
import { expectHostileLog, hostileLogCode, sha256 } from "./support/hostile-log";
import {
  type EngineScenario,
  registerRecipe,
  runSpec,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { connectLive, emitWithAck, RunRecorder } from "./support/live-client";
import { tokenFor } from "./support/people";
import { waitFor } from "./support/wait-for";

const root = fileURLToPath(new URL("../..", import.meta.url));

/** Seconds between the job's 10 batches: it writes for about 12 s, long enough to join while it runs. */
const PAUSE_SECONDS = 1.2;
const FINAL_STATES = ["done", "failed", "cancelled"];

let scenario: EngineScenario;
let recipeId = "";
let token = "";

beforeAll(async () => {
  scenario = await startEngineScenario("live_bytes");
  recipeId = await registerRecipe(scenario.sf, "hostile-log", [
    { name: "emit", code: hostileLogCode("live-bytes") },
  ]);
  token = await tokenFor(scenario.database.db, scenario.sf.researcher);
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

async function submit(name: string): Promise<string> {
  const { sf } = scenario;
  const created = await sf.api(
    "POST",
    `/api/groups/${sf.groupId}/runs`,
    runSpec(recipeId, scenario.hostId, { emit: { pause: PAUSE_SECONDS } }, name),
  );
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  return created.body.id as string;
}

/** The run's state and the sequence number of its last stored chunk, read from its row. */
async function storedSoFar(runId: string): Promise<{ state: string; seq: number }> {
  const { rows } = await scenario.database.pool.query("select state, log_seq from runs where id = $1", [
    runId,
  ]);
  return { state: rows[0].state, seq: rows[0].log_seq };
}

/** Waits until `minSeq` chunks are stored while the job still writes; fails if the run ended first. */
async function storedWhileRunning(runId: string, minSeq: number) {
  const stored = await waitFor(
    `${minSeq} chunks of run ${runId} stored while it runs`,
    () => storedSoFar(runId),
    (row) => row.seq >= minSeq || FINAL_STATES.includes(row.state),
    { timeoutMs: 60_000 },
  );
  expect(stored.state).toBe("running");
  return stored;
}

const jobLog = (runId: string) => readFile(path.join(runDirOnHost(scenario.host.rootDir, runId), "job.log"));

const oneTo = (n: number) => Array.from({ length: n }, (_, i) => i + 1);

type CliResult = { code: number | null; stdout: Buffer; stderr: string };

/** `sigmaflow <args>` as a child process with the server's address and the researcher's token. */
function sigmaflow(args: string[], onStdout: () => void): Promise<CliResult> {
  const child = spawn(process.execPath, ["bin/sigmaflow.mjs", ...args], {
    cwd: root,
    env: { ...process.env, SIGMAFLOW_URL: scenario.sf.app.baseUrl, SIGMAFLOW_TOKEN: token },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const stdout: Buffer[] = [];
  let stderr = "";
  child.stdout.on("data", (data: Buffer) => {
    stdout.push(data);
    onStdout();
  });
  child.stderr.on("data", (data: Buffer) => {
    stderr += data.toString("utf8");
  });
  return new Promise((resolve) =>
    child.on("close", (code) => resolve({ code, stdout: Buffer.concat(stdout), stderr })),
  );
}

describe("the hostile log over the live feed, byte for byte", () => {
  it("a socket.io client joining while the job writes gets the log file's bytes, replayed and then live", async () => {
    const { sf } = scenario;
    const runId = await submit("live bytes");
    // Several chunks to replay before the rest comes live.
    const beforeJoin = await storedWhileRunning(runId, 5);

    const socket = await connectLive(sf.app.baseUrl, { token });
    const recorder = new RunRecorder(runId).attach(socket);
    // Should the feed run past its send budget (a replay of megabytes can), it pauses, and the client
    // resumes from the last chunk it holds, as the browser and `watch` do.
    const resumes: { lastSentSeq: number; heldSeq: number; answer: Promise<LiveAck> }[] = [];
    socket.on(LIVE_EVENTS.paused, (raw: unknown) => {
      const pause = liveRunPausedSchema.parse(raw);
      if (pause.runId !== runId) return;
      const heldSeq = recorder.lastSeq;
      const answer = emitWithAck(socket, LIVE_EVENTS.resumeRun, { runId, afterSeq: heldSeq });
      resumes.push({ lastSentSeq: pause.lastSentSeq, heldSeq, answer });
    });
    expect(await emitWithAck(socket, LIVE_EVENTS.joinRun, { runId, afterSeq: 0 })).toEqual({ ok: true });
    const afterJoin = await storedSoFar(runId);
    expect(afterJoin.state).toBe("running");

    await recorder.untilState("done", 90_000);
    const last = (await storedSoFar(runId)).seq;
    await recorder.untilSeq(last, 30_000);
    // Chunks 1..beforeJoin.seq were stored before the client connected (replayed); those after
    // afterJoin.seq were stored once the join was answered (sent live).
    expect(beforeJoin.seq).toBeGreaterThanOrEqual(5);
    expect(last).toBeGreaterThan(afterJoin.seq);

    expect(recorder.seqs()).toEqual(oneTo(last));
    let offset = 0;
    for (const chunk of recorder.chunks) {
      expect(chunk.offsetBytes, `chunk ${chunk.seq}`).toBe(offset);
      offset += chunk.data.length;
    }
    const file = await jobLog(runId);
    expectHostileLog(file);
    const received = recorder.bytes();
    expect(received.length).toBe(file.length);
    expect(sha256(received)).toBe(sha256(file));
    // Each pause came after every chunk sent before it (one connection keeps the order).
    for (const resume of resumes) {
      expect(resume.lastSentSeq).toBe(resume.heldSeq);
      expect(await resume.answer).toEqual({ ok: true });
    }
    socket.disconnect();
  }, 120_000);

  it("sigmaflow runs watch started while the job writes prints the log file's bytes and exits 0 for done", async () => {
    const runId = await submit("watch bytes");
    // Started once the log has begun: the command line itself takes a few seconds to start.
    await storedWhileRunning(runId, 1);

    let atFirstOutput: Promise<{ state: string; seq: number }> | undefined;
    const watch = await sigmaflow(["runs", "watch", runId], () => {
      atFirstOutput ??= storedSoFar(runId);
    });

    // Nothing on stderr: the live feed carried the log (a fall-back to HTTP is announced there).
    expect(watch.stderr).toBe("");
    expect(watch.code).toBe(0);
    expect((await waitForState(scenario.sf, runId, FINAL_STATES)).state).toBe("done");
    // The first bytes reached stdout while the job still wrote, and more chunks were stored after them.
    expect(atFirstOutput).toBeDefined();
    const first = await atFirstOutput!;
    expect(first.state).toBe("running");
    expect((await storedSoFar(runId)).seq).toBeGreaterThan(first.seq);

    const file = await jobLog(runId);
    expectHostileLog(file);
    expect(watch.stdout.length).toBe(file.length);
    expect(sha256(watch.stdout)).toBe(sha256(file));
  }, 120_000);
});
