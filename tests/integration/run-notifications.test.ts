/**
 * What a listening server hears on sigmaflow_run_events (drizzle/0004): one notification per state
 * change, in order, and one per stored log chunk, each delivered when its transaction commits.
 */
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { RUN_NOTIFY_CHANNEL } from "../../server/execution/run-transitions";
import {
  type FakeHost,
  registerDevHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startFakeHost,
  startSigmaflow,
  waitForState,
} from "./support/lifecycle-harness";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let listener: pg.Client;
const heard: { runId: string; type: string; state?: string; seq?: number }[] = [];

beforeAll(async () => {
  database = await createTestDatabase("notify");
  sf = await startSigmaflow(database);
  host = await startFakeHost();
  listener = new pg.Client({ connectionString: database.url });
  await listener.connect();
  listener.on("notification", (message) => {
    if (message.channel === RUN_NOTIFY_CHANNEL) heard.push(JSON.parse(message.payload ?? "{}"));
  });
  await listener.query(`listen ${RUN_NOTIFY_CHANNEL}`);
}, 60_000);

afterAll(async () => {
  await listener?.end();
  await sf?.close();
  await host?.stop();
  await database?.drop();
});

describe("run notifications", () => {
  it("announces every state change in order and every stored log chunk", async () => {
    const hostId = await registerDevHost(sf, host, { name: "notify-host" });
    const recipeId = await registerShellRecipe(sf, "notified");
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "N2" } }),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const run = await waitForState(sf, created.body.id, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    // Notifications arrive asynchronously after commit; the last one follows the settling commit.
    await expect.poll(() => heard.filter((n) => n.runId === run.id && n.state === "done").length).toBe(1);
    const mine = heard.filter((n) => n.runId === run.id);
    const states = mine.filter((n) => n.type === "state").map((n) => n.state);
    expect(states).toEqual((run.events as { toState: string }[]).map((e) => e.toState));
    const logs = mine.filter((n) => n.type === "log").map((n) => n.seq);
    const { rows } = await database.pool.query(
      "select seq from run_log_chunks where run_id = $1 order by seq",
      [run.id],
    );
    expect(logs).toEqual(rows.map((r) => r.seq));
    expect(logs.length).toBeGreaterThan(0);
  });
});
