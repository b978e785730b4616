/**
 * The same run lifecycle against real engines: Debian's OpenSSH server and a single-node Slurm with
 * accounting (deploy/engines/start-engines.sh, started by deploy/test.sh). The run goes through sbatch
 * with Sigmaflow's token in the job name, is followed with squeue/sacct, cancelled with scancel, and
 * charged the core-seconds sacct reports (ElapsedRaw × AllocCPUS).
 */
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  registerHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startSigmaflow,
  waitForState,
} from "./support/lifecycle-harness";
import { createTestDatabase, type TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

const engine = {
  host: process.env.ENGINE_SSH_HOST,
  port: Number(process.env.ENGINE_SSH_PORT),
  user: process.env.ENGINE_SSH_USER ?? "sfrun",
  key: process.env.ENGINE_SSH_KEY,
  base: process.env.ENGINE_REMOTE_BASE,
  slurmConf: process.env.ENGINE_SLURM_CONF,
};

let database: TestDatabase;
let sf: Sigmaflow;
let hostId: string;
let recipeId: string;

/**
 * sacct rows of jobs whose name is the run's token: how many jobs were ever submitted. A short job's
 * name reaches the accounting database a few seconds after its end state, so wait for the record.
 */
function jobsNamed(token: string): Promise<string[]> {
  return waitFor(
    `the sacct record of ${token}`,
    () => sacctByName(token),
    (rows) => rows.length > 0,
    {
      timeoutMs: 20_000,
    },
  );
}

function sacctByName(token: string): string[] {
  const out = execFileSync(
    "sacct",
    ["-n", "-X", "-P", "-a", `--name=${token}`, "-S", "now-1hour", "-o", "JobID,State"],
    {
      env: { ...process.env, SLURM_CONF: engine.slurmConf },
      encoding: "utf8",
    },
  );
  return out.split("\n").filter(Boolean);
}

beforeAll(async () => {
  if (!engine.host || !engine.key || !engine.base) {
    throw new Error("ENGINE_SSH_HOST and friends are not set: run the suites through `bash deploy/test.sh`.");
  }
  database = await createTestDatabase("slurmrun");
  sf = await startSigmaflow(database);
  hostId = await registerHost(
    sf,
    {
      name: "slurm-node",
      address: engine.host,
      port: engine.port,
      scheduler: "slurm",
      remoteBaseDir: `${engine.base}/lifecycle`,
    },
    { username: engine.user, privateKey: readFileSync(engine.key, "utf8") },
  );
  recipeId = await registerShellRecipe(sf, "slurm-two-stage");
}, 60_000);

afterAll(async () => {
  await sf?.close();
  await database?.drop();
});

describe("runs on a real Slurm over real OpenSSH", () => {
  it("runs to done, collects outputs and charges the scheduler's accounting", async () => {
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "NH3", sleepSeconds: 1 } }),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const run = await waitForState(sf, created.body.id, ["done", "failed"], 60_000);
    expect(run.state, run.stateMessage).toBe("done");
    expect(run.schedulerJobId).toMatch(/^\d+$/);
    expect(run.artifacts.map((a: { name: string }) => a.name).sort()).toEqual([
      "kmatrix.dat",
      "orbitals.dat",
    ]);
    expect(run.timings).toHaveLength(4);
    const { rows } = await database.pool.query(
      "select kind, core_seconds, note from ledger_entries where run_id = $1 order by id",
      [run.id],
    );
    const charge = rows.find((r) => r.kind === "charge");
    // The job sleeps 1 s on 1 CPU: sacct reports at least 1 elapsed second (its resolution is 1 s).
    expect(charge.note).toBe("scheduler accounting");
    expect(Number(charge.core_seconds)).toBeGreaterThanOrEqual(1);
    expect(Number(charge.core_seconds)).toBeLessThan(60);
    const token = (await database.pool.query("select submit_token from runs where id = $1", [run.id])).rows[0]
      .submit_token;
    expect(await jobsNamed(token)).toHaveLength(1);
  }, 90_000);

  it("cancels a running job with scancel and records cancelled once Slurm confirms", async () => {
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "long", sleepSeconds: 40 } }, "long"),
    );
    await waitForState(sf, created.body.id, ["running"], 60_000);
    const cancelled = await sf.api("POST", `/api/runs/${created.body.id}/cancel`);
    expect(cancelled.body.cancelRequested).toBe(true);
    const run = await waitForState(sf, created.body.id, ["cancelled", "failed", "done"], 60_000);
    expect(run.state).toBe("cancelled");
    const token = (await database.pool.query("select submit_token from runs where id = $1", [run.id])).rows[0]
      .submit_token;
    const jobs = await jobsNamed(token);
    expect(jobs).toHaveLength(1);
    expect(jobs[0]).toMatch(/CANCELLED/);
  }, 90_000);

  it("a worker killed right after submission finds the job by its token instead of submitting again", async () => {
    await sf.stopInProcessWorker();
    sf.spawnWorker();
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "kill", sleepSeconds: 3 } }, "killed"),
    );
    await waitForState(sf, created.body.id, ["submitted", "running"], 60_000);
    sf.killWorkerHard();
    // Make the restarted worker repeat the submission step: it must find the existing job.
    await database.pool.query("update runs set state = 'staging' where id = $1", [created.body.id]);
    sf.spawnWorker();
    const run = await waitForState(sf, created.body.id, ["done", "failed"], 60_000);
    expect(run.state, run.stateMessage).toBe("done");
    const token = (await database.pool.query("select submit_token from runs where id = $1", [run.id])).rows[0]
      .submit_token;
    expect(await jobsNamed(token)).toHaveLength(1);
    expect(run.events.map((e: { message: string | null }) => e.message)).toContainEqual(
      expect.stringContaining("submitted earlier"),
    );
  }, 120_000);
});
