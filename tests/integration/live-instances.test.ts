/**
 * Several server instances behind one address: each listens to PostgreSQL itself, so a client of either
 * instance gets every chunk of a run, exactly once and in order, also when an instance's LISTEN
 * connection is cut mid-run (its feeds catch up from the stored log once it listens again). Checked
 * against the stored log (GET /api/runs/:id/log/raw and the run_log_chunks rows).
 */
import { afterAll, beforeAll, expect, it } from "vitest";
import { LISTENER_APPLICATION_NAME } from "../../server/realtime/run-notices";
import { LIVE_EVENTS } from "../../shared/schemas/live";
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

const LINES = 60;
const SCRIPT = [
  "i=1",
  `while [ "$i" -le ${LINES} ]; do echo "instance line $i"; sleep 0.1; i=$((i + 1)); done`,
].join("\n");

let scenario: EngineScenario;
let second: Awaited<ReturnType<typeof startTestApp>>;
let recipeId = "";
let token = "";

async function storedSeqs(id: string): Promise<number[]> {
  const rows = await scenario.database.pool.query<{ seq: number }>(
    "select seq from run_log_chunks where run_id = $1 order by seq",
    [id],
  );
  return rows.rows.map((row) => row.seq);
}

beforeAll(async () => {
  scenario = await startEngineScenario("live_instances");
  second = await startTestApp(scenario.database);
  recipeId = await registerRecipe(scenario.sf, "instance-lines", [
    { name: "count", code: shellCode({ script: SCRIPT }) },
  ]);
  token = await tokenFor(scenario.database.db, scenario.sf.researcher);
}, 60_000);

afterAll(async () => {
  await second?.close();
  await scenario?.close();
});

it("delivers every chunk through each of two instances, also across a lost LISTEN connection", async () => {
  const { sf } = scenario;
  const instances = [sf.app, second];
  const created = await sf.api(
    "POST",
    `/api/groups/${sf.groupId}/runs`,
    runSpec(recipeId, scenario.hostId, { count: {} }, "two instances"),
  );
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  const runId = created.body.id as string;

  const recorders = await Promise.all(
    instances.map(async (instance) => {
      const socket = await connectLive(instance.baseUrl, { token });
      const recorder = new RunRecorder(runId).attach(socket);
      expect(await emitWithAck(socket, LIVE_EVENTS.joinRun, { runId, afterSeq: 0 })).toEqual({ ok: true });
      return { socket, recorder };
    }),
  );

  await waitForState(sf, runId, ["running"]);
  await recorders[0]!.recorder.untilSeq(3);
  // Both instances lose their LISTEN connection while the run writes; notices sent meanwhile are lost.
  const cut = await scenario.database.pool.query(
    "select pg_terminate_backend(pid) from pg_stat_activity where application_name = $1 and datname = current_database()",
    [LISTENER_APPLICATION_NAME],
  );
  expect(cut.rowCount).toBe(2);
  await waitFor(
    "both instances to stop listening",
    () => instances.map((i) => i.live.listening()),
    (l) => l.every((listening) => !listening),
  );
  await waitFor(
    "both instances to listen again",
    () => instances.map((i) => i.live.listening()),
    (l) => l.every(Boolean),
  );

  await waitForState(sf, runId, ["done"], 30_000);
  const seqs = await storedSeqs(runId);
  const last = seqs.at(-1)!;
  expect(seqs).toEqual(Array.from({ length: last }, (_, i) => i + 1));
  const response = await fetch(`${sf.app.baseUrl}/api/runs/${runId}/log/raw`, {
    headers: { authorization: `Bearer ${token}` },
  });
  expect(response.status).toBe(200);
  const raw = Buffer.from(await response.arrayBuffer()).toString("latin1");
  expect(raw).toContain(`instance line ${LINES}\n`);
  for (const { socket, recorder } of recorders) {
    await recorder.untilSeq(last);
    expect(recorder.seqs()).toEqual(seqs);
    expect(recorder.bytes().toString("latin1")).toBe(raw);
    await recorder.untilState("done");
    socket.disconnect();
  }
}, 45_000);
