/**
 * The live run feed (socket.io at /api/live, shared/schemas/live.ts) against a real run: a shell code
 * prints a numbered line every 0.1 s for about ten seconds while the worker stores the log in chunks.
 * Checked against the stored log itself (GET /api/runs/:id/log/raw and the run_log_chunks rows): every
 * chunk arrives exactly once and in order, for a client that joins mid-run, for one that leaves and comes
 * back with its last sequence number, for one that never acknowledges (paused at the send budget, then
 * resumed), and for a run that reused another's results (served the original's log, as HTTP does).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { LIVE_EVENTS, type LiveGroupRun, liveGroupRunSchema } from "../../shared/schemas/live";
import { shellCode } from "./support/code-fixtures";
import {
  type EngineScenario,
  registerRecipe,
  runSpec,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { connectLive, emitWithAck, RunRecorder } from "./support/live-client";
import { tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { waitFor } from "./support/wait-for";

const LINES = 100;
/** Multi-byte UTF-8 and ANSI colour in every line: the feed carries bytes, not text. */
const SCRIPT = [
  "i=1",
  `while [ "$i" -le ${LINES} ]; do`,
  `  printf 'line %03d of ${LINES} caf\\303\\251 \\033[1mbold\\033[0m\\n' "$i"`,
  "  sleep 0.1",
  "  i=$((i + 1))",
  "done",
].join("\n");

let scenario: EngineScenario;
let recipeId = "";
let token = "";
let runId = "";

async function storedSeqs(id: string): Promise<number[]> {
  const rows = await scenario.database.pool.query<{ seq: number }>(
    "select seq from run_log_chunks where run_id = $1 order by seq",
    [id],
  );
  return rows.rows.map((row) => row.seq);
}

async function rawLog(id: string): Promise<Buffer> {
  const response = await fetch(`${scenario.sf.app.baseUrl}/api/runs/${id}/log/raw`, {
    headers: { authorization: `Bearer ${token}` },
  });
  expect(response.status).toBe(200);
  return Buffer.from(await response.arrayBuffer());
}

const oneTo = (n: number) => Array.from({ length: n }, (_, i) => i + 1);

beforeAll(async () => {
  scenario = await startEngineScenario("live_feed");
  recipeId = await registerRecipe(scenario.sf, "numbered-lines", [
    { name: "count", code: shellCode({ script: SCRIPT }) },
  ]);
  token = await tokenFor(scenario.database.db, scenario.sf.researcher);
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

describe("the live feed of a running run", () => {
  it("sends every chunk once and in order, to a client that joins mid-run and to one that leaves and comes back; state changes arrive as run:state", async () => {
    const { sf } = scenario;
    const baseUrl = sf.app.baseUrl;
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, scenario.hostId, { count: {} }, "numbered lines"),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    runId = created.body.id;

    const groupSocket = await connectLive(baseUrl, { token });
    const groupRuns: LiveGroupRun[] = [];
    groupSocket.on(LIVE_EVENTS.groupRun, (raw: unknown) => groupRuns.push(liveGroupRunSchema.parse(raw)));
    expect(await emitWithAck(groupSocket, LIVE_EVENTS.joinGroup, { groupId: sf.groupId })).toEqual({
      ok: true,
    });

    await waitForState(sf, runId, ["running"]);
    const a = await connectLive(baseUrl, { token });
    const recA = new RunRecorder(runId).attach(a);
    expect(await emitWithAck(a, LIVE_EVENTS.joinRun, { runId, afterSeq: 0 })).toEqual({ ok: true });

    const recB = new RunRecorder(runId);
    const b1 = await connectLive(baseUrl, { token });
    recB.attach(b1);
    expect(await emitWithAck(b1, LIVE_EVENTS.joinRun, { runId })).toEqual({ ok: true });
    await recB.untilSeq(4);
    b1.disconnect();
    const heldSeq = recB.lastSeq;
    // While B is away the log grows by a few chunks it must get on its return, and nothing else.
    await waitFor(
      "three more chunks stored while B is away",
      () => storedSeqs(runId),
      (seqs) => seqs.includes(heldSeq + 3),
    );
    const b2 = await connectLive(baseUrl, { token });
    recB.attach(b2);
    expect(await emitWithAck(b2, LIVE_EVENTS.joinRun, { runId, afterSeq: heldSeq })).toEqual({ ok: true });

    await recA.untilState("done", 40_000);
    const seqs = await storedSeqs(runId);
    const last = seqs.at(-1)!;
    expect(seqs).toEqual(oneTo(last));
    // Polled every 200 ms over ~10 s: the log arrived in many pieces, so the feed really was live.
    expect(last).toBeGreaterThan(10);
    await recA.untilSeq(last);
    await recB.untilSeq(last);
    const raw = await rawLog(runId);
    expect(raw.toString("latin1")).toContain(`line ${LINES} of ${LINES}`);

    expect(recA.seqs()).toEqual(oneTo(last));
    expect(recA.bytes().toString("latin1")).toBe(raw.toString("latin1"));
    expect(recB.seqs()).toEqual(oneTo(last));
    expect(recB.bytes().toString("latin1")).toBe(raw.toString("latin1"));
    expect(recA.chunks.map((c) => c.offsetBytes)).toEqual(
      recA.chunks.map((_, i) => recA.chunks.slice(0, i).reduce((sum, c) => sum + c.data.length, 0)),
    );

    // The state the client joined at, then each later change once, as the run's events record them.
    const detail = await sf.api("GET", `/api/runs/${runId}`);
    const events = (detail.body.events as { toState: string; message: string | null; at: string }[]).filter(
      (e) => ["running", "collecting", "done"].includes(e.toState),
    );
    expect(recA.states.map(({ state, message, at }) => ({ toState: state, message, at }))).toEqual(
      events.map(({ toState, message, at }) => ({ toState, message, at })),
    );
    expect(recA.progress.length).toBeGreaterThan(0);
    expect(recA.progress.every((p) => p.runId === runId && Array.isArray(p.timings))).toBe(true);

    await waitFor(
      "the done run's summary in the group room",
      () => groupRuns,
      (seen) => seen.some((event) => event.run.id === runId && event.run.state === "done"),
    );
    expect(groupRuns.every((event) => event.groupId === sf.groupId)).toBe(true);
    for (const socket of [groupSocket, a, b2]) socket.disconnect();
  }, 50_000);

  it("pauses a client that never acknowledges at its send budget and resumes it from its last sequence number", async () => {
    expect(runId, "the first test's run").not.toBe("");
    const budgetBytes = 600;
    const app = await startTestApp(scenario.database, { live: { sendBudgetBytes: budgetBytes } });
    try {
      const last = (await storedSeqs(runId)).at(-1)!;
      const socket = await connectLive(app.baseUrl, { token });
      const recorder = new RunRecorder(runId, { acknowledge: false }).attach(socket);
      expect(await emitWithAck(socket, LIVE_EVENTS.joinRun, { runId, afterSeq: 0 })).toEqual({ ok: true });
      let resumedAt = 0;
      let handled = 0;
      while (recorder.lastSeq < last) {
        await waitFor(
          "a pause or the last chunk",
          () => recorder.paused.length > handled || recorder.lastSeq === last,
          Boolean,
          { context: () => JSON.stringify({ seqs: recorder.seqs(), paused: recorder.paused, last }) },
        );
        const pause = recorder.paused[handled];
        if (!pause) break;
        handled += 1;
        // Everything sent before the pause arrived before it (one connection keeps the order), nothing after.
        expect(pause.lastSentSeq).toBe(recorder.lastSeq);
        const sinceResume = recorder.chunks.filter((c) => c.seq > resumedAt);
        const sentBytes = sinceResume.reduce((sum, c) => sum + c.data.length, 0);
        const largest = Math.max(...sinceResume.map((c) => c.data.length));
        expect(sentBytes).toBeLessThanOrEqual(Math.max(budgetBytes, largest));
        resumedAt = recorder.lastSeq;
        expect(await emitWithAck(socket, LIVE_EVENTS.resumeRun, { runId, afterSeq: resumedAt })).toEqual({
          ok: true,
        });
      }
      expect(recorder.paused.length).toBeGreaterThan(1);
      expect(recorder.seqs()).toEqual(oneTo(last));
      expect(recorder.bytes().toString("latin1")).toBe((await rawLog(runId)).toString("latin1"));
      socket.disconnect();
    } finally {
      await app.close();
    }
  }, 30_000);

  it("sends a client that joined without the log its state only, and the log once it asks for it", async () => {
    expect(runId, "the first test's run").not.toBe("");
    const last = (await storedSeqs(runId)).at(-1)!;
    const socket = await connectLive(scenario.sf.app.baseUrl, { token });
    const recorder = new RunRecorder(runId).attach(socket);
    expect(await emitWithAck(socket, LIVE_EVENTS.joinRun, { runId, log: false })).toEqual({ ok: true });
    // The stored log would be on its way within a few hundred milliseconds (the joins above show it).
    await new Promise((resolve) => setTimeout(resolve, 1500));
    expect(recorder.chunks).toEqual([]);
    expect(await emitWithAck(socket, LIVE_EVENTS.joinRun, { runId, afterSeq: 0 })).toEqual({ ok: true });
    await recorder.untilSeq(last);
    expect(recorder.seqs()).toEqual(oneTo(last));
    socket.disconnect();
  });

  it("serves a run that reused another's results the original's log", async () => {
    expect(runId, "the first test's run").not.toBe("");
    const { sf } = scenario;
    const reused = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      ...runSpec(recipeId, scenario.hostId, { count: {} }, "numbered lines"),
      onDuplicate: "reuse",
    });
    expect(reused.status, JSON.stringify(reused.body)).toBe(201);
    expect(reused.body.reusedFrom).toBe(runId);
    const reusedId = reused.body.id as string;
    const last = (await storedSeqs(runId)).at(-1)!;
    expect(await storedSeqs(reusedId)).toEqual([]);

    const socket = await connectLive(sf.app.baseUrl, { token });
    const recorder = new RunRecorder(reusedId).attach(socket);
    expect(await emitWithAck(socket, LIVE_EVENTS.joinRun, { runId: reusedId, afterSeq: 0 })).toEqual({
      ok: true,
    });
    await recorder.untilSeq(last);
    await recorder.untilState("done");
    expect(recorder.seqs()).toEqual(oneTo(last));
    expect(recorder.bytes().toString("latin1")).toBe((await rawLog(reusedId)).toString("latin1"));
    expect(recorder.bytes().toString("latin1")).toBe((await rawLog(runId)).toString("latin1"));
    socket.disconnect();
  });
});
