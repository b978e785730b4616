/**
 * Regression: the `direct` scheduler did not enforce a run's wall-time limit — a run with a 1-minute
 * limit ran 100 s and was charged more core-hours than it had reserved, so an allocation could be
 * overspent. A batch scheduler stops a job at its limit (TERM, then KILL after a grace period) and
 * reports it (Slurm: TIMEOUT); the run then fails with the limit as its reason, and is charged at most
 * its reservation, with any use beyond it stated in the ledger and the run's history.
 *
 * The limit is 1 minute, the smallest a run spec allows (shared/schemas/runs.ts). The code
 * ignores TERM, so it outlives the batch script and is ended by KILL after the worker's grace period
 * (2 s here).
 * Expected figures: reservation = cores × wall time = 1 × 60 core-seconds (DEVELOPERS.md, run creation).
 */
import { readFile } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadWorkerConfig } from "../../worker/config";
import { startWorker } from "../../worker/index";
import { shellCode } from "./support/code-fixtures";
import {
  type FakeHost,
  registerDevHost,
  registerRecipe,
  type Sigmaflow,
  startFakeHost,
  startSigmaflow,
  waitForState,
} from "./support/lifecycle-harness";
import { createTestDatabase, type TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

const GRACE_SECONDS = 2;

let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let recipeId: string;
let worker: Awaited<ReturnType<typeof startWorker>> | null = null;

beforeAll(async () => {
  database = await createTestDatabase("wall_time");
  sf = await startSigmaflow(database, { inProcessWorker: false });
  worker = await startWorker(
    loadWorkerConfig({
      ...sf.workerEnv,
      WORKER_WALL_TIME_GRACE_SECONDS: String(GRACE_SECONDS),
    } as never),
  );
  host = await startFakeHost();
  hostId = await registerDevHost(sf, host);
  const stubborn = shellCode({
    name: "stubborn",
    // Ignores TERM (and so does its sleep, which inherits the ignored signal), records its pid.
    script: "trap '' TERM\necho $$ > code.pid\necho working\nsleep {{ seconds }}\necho finished\n",
    scriptFormat: "shell",
    parameters: {
      type: "object",
      properties: { seconds: { type: "integer", minimum: 1, maximum: 1000 } },
      required: ["seconds"],
      additionalProperties: false,
    },
  });
  recipeId = await registerRecipe(sf, "stubborn", [{ name: "work", code: stubborn }]);
}, 60_000);

afterAll(async () => {
  await worker?.stop();
  await sf?.close();
  await host?.stop();
  await database?.drop();
});

function isLive(pid: number): Promise<boolean> {
  return readFile(`/proc/${pid}/stat`, "utf8").then(
    (stat) => stat.slice(stat.lastIndexOf(")") + 2)[0] !== "Z",
    () => false,
  );
}

describe("a run over its wall-time limit on a direct host", () => {
  it("is stopped at the limit, fails with the limit as reason, and is charged no more than it reserved unannounced", async () => {
    const created = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: {
        name: "overrun",
        recipeId,
        hostId,
        parameters: { work: { seconds: 100 } },
        resources: { cores: 1, wallTimeMinutes: 1 },
      },
      onDuplicate: "run",
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const run = await waitForState(sf, created.body.id, ["done", "failed", "cancelled"], 85_000);

    expect(run.state).toBe("failed");
    expect(run.stateMessage).toContain("Stopped at its wall-time limit of 1 min");

    const runDir = path.join(host.rootDir, "runs", `sf-run-${run.id}`);
    const seconds = async (name: string) =>
      Number.parseFloat(await readFile(path.join(runDir, name), "utf8"));
    const elapsed = (await seconds("job.ended")) - (await seconds("job.started"));
    // The batch script ends with TERM at 60 s; under 75 s allows a loaded 2-core machine.
    expect(elapsed).toBeGreaterThanOrEqual(60);
    expect(elapsed).toBeLessThan(75);
    const log = await sf.api("GET", `/api/runs/${run.id}/log`);
    const logText = Buffer.concat(
      log.body.chunks.map((c: { dataBase64: string }) => Buffer.from(c.dataBase64, "base64")),
    ).toString("utf8");
    expect(logText).not.toContain("finished");
    // The code ignored TERM and outlived the batch script: KILL after the grace period ends it.
    const codePid = Number((await readFile(path.join(runDir, "stage-1-work", "code.pid"), "utf8")).trim());
    await waitFor(
      "the code to be killed after the grace period",
      () => isLive(codePid),
      (live) => !live,
      { timeoutMs: 10_000 },
    );

    // 1 core × 1 min = 60 core-seconds reserved; the job used at least that, and pays exactly that.
    const { rows: ledger } = await database.pool.query(
      "select kind, core_seconds::bigint as s, note from ledger_entries where run_id = $1 order by id",
      [run.id],
    );
    const entries = ledger.map((row) => ({ kind: row.kind, coreSeconds: Number(row.s), note: row.note }));
    expect(entries.find((e) => e.kind === "reserve")?.coreSeconds).toBe(60);
    expect(entries.find((e) => e.kind === "release")?.coreSeconds).toBe(60);
    const charge = entries.find((e) => e.kind === "charge");
    expect(charge?.coreSeconds).toBe(60);
    expect(run.chargedCoreHours).toBeCloseTo(60 / 3600, 4);
    // Use beyond the reservation (whole core-seconds, as charged) is stated in the ledger and history.
    const over = Math.round(elapsed) > 60;
    expect(/over its reservation/.test(charge?.note ?? "")).toBe(over);
    const last = run.events.at(-1);
    expect(last.toState).toBe("failed");
    expect(/over its reservation/.test(last.message)).toBe(over);
  }, 100_000);
});
