/**
 * Two worker processes on one database stream a running job's log once, not twice: each stream holds a
 * claim on its run (worker/run-claims.ts, kind "log-follow"), and the worker that finds it taken leaves
 * the log to the other. The log still arrives whole (the API's log is the host's file byte for byte),
 * and when the streaming worker stops, the other takes the log over.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadWorkerConfig } from "../../worker/config";
import { startWorker } from "../../worker/index";
import { apiLogText, hostFile } from "./support/fault-helpers";
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
import { waitFor } from "./support/wait-for";

type Worker = Awaited<ReturnType<typeof startWorker>>;

let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId = "";
let recipeId = "";
const workers: (Worker | null)[] = [];

beforeAll(async () => {
  database = await createTestDatabase("follow_claims");
  sf = await startSigmaflow(database, { inProcessWorker: false });
  host = await startFakeHost();
  hostId = await registerDevHost(sf, host, { name: "claims-host" });
  recipeId = await registerShellRecipe(sf, "ticking", { tick: true });
  for (let i = 0; i < 2; i++) workers.push(await startWorker(loadWorkerConfig(sf.workerEnv as never)));
}, 60_000);

afterAll(async () => {
  for (const worker of workers) await worker?.stop();
  await sf?.close();
  await host?.stop();
  await database?.drop();
});

const followedBy = () => workers.map((worker) => worker?.ctx.logFollowers.stats().followed ?? 0);

describe("two workers, one running log", () => {
  it("streams it from one worker only, and the other takes over when that one stops", async () => {
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "claimed", sleepSeconds: 8 } }, "claimed log"),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const runId = created.body.id as string;
    await waitForState(sf, runId, ["running"]);

    // Sampled every 50 ms while the job writes: one stream at a time across both workers.
    const samples: number[][] = [];
    const first = await waitFor(
      "one of the workers to stream the log",
      () => {
        const now = followedBy();
        samples.push(now);
        return now;
      },
      (now) => now[0]! + now[1]! > 0,
      { intervalMs: 50 },
    );
    const streaming = first[0]! > 0 ? 0 : 1;
    const deadline = Date.now() + 2_000;
    while (Date.now() < deadline) {
      samples.push(followedBy());
      await new Promise((resolve) => setTimeout(resolve, 50));
    }
    expect(
      samples.every(([a, b]) => a! + b! <= 1),
      JSON.stringify(samples),
    ).toBe(true);

    // The streaming worker stops (as on a deploy): its claim goes with it and the other streams on.
    await workers[streaming]!.stop();
    workers[streaming] = null;
    const other = 1 - streaming;
    await waitFor(
      "the other worker to take the log over",
      () => workers[other]!.ctx.logFollowers.stats().followed,
      (count) => count === 1,
      { timeoutMs: 10_000 },
    );

    const run = await waitForState(sf, runId, ["done", "failed", "cancelled"], 45_000);
    expect(run.state, run.stateMessage).toBe("done");
    const jobLog = await hostFile(host.rootDir, runId, "job.log");
    expect(jobLog).toMatch(/tick 79\n/);
    expect(await apiLogText(sf.api, runId)).toBe(jobLog);
  }, 90_000);
});
