/**
 * A researcher's runs through the whole engine on the development host (direct scheduler): a two-stage
 * recipe runs to `done`, logs and per-symmetry timings arrive, declared outputs are collected, the
 * ledger is charged and the reservation released; cancel, resubmit, reuse, hostile parameters.
 * Expected behaviour is Sigmaflow's run lifecycle (DEVELOPERS.md, run states).
 */
import { existsSync } from "node:fs";
import { readFile } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  type FakeHost,
  registerHost,
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
let hostId: string;
let recipeId: string;

beforeAll(async () => {
  database = await createTestDatabase("lifecycle");
  sf = await startSigmaflow(database);
  host = await startFakeHost();
  hostId = await registerHost(
    sf,
    { name: "dev-host", address: "127.0.0.1", port: host.port, scheduler: "direct", remoteBaseDir: "runs" },
    { username: "sigmaflow", authorize: host.authorize },
  );
  recipeId = await registerShellRecipe(sf);
}, 60_000);

afterAll(async () => {
  await sf?.close();
  await host?.stop();
  await database?.drop();
});

async function ledgerSum(runId: string) {
  const { rows } = await database.pool.query(
    "select kind, sum(core_seconds)::bigint as s from ledger_entries where run_id = $1 group by kind",
    [runId],
  );
  return Object.fromEntries(rows.map((r) => [r.kind, Number(r.s)]));
}

describe("a two-stage run on the development host", () => {
  it("runs to done with logs, timings, collected outputs and an exact ledger", async () => {
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "CH4-td" } }),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    expect(created.body.state).toBe("queued");
    expect(created.body.reservedCoreHours).toBeCloseTo(10 / 60, 4); // 1 core × 10 min
    const run = await waitForState(sf, created.body.id, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    expect(run.events.map((e: { toState: string }) => e.toState)).toEqual([
      "queued",
      "staging",
      "submitted",
      "running",
      "collecting",
      "done",
    ]);
    expect(run.timings.map((t: { symmetry: string }) => t.symmetry).sort()).toEqual(["A1", "A2", "B1", "B2"]);
    expect(run.timings[0].seconds).toBeCloseTo(0.25, 6);
    const names = run.artifacts.map((a: { stage: string; name: string }) => `${a.stage}/${a.name}`).sort();
    expect(names).toEqual(["prepare/orbitals.dat", "scatter/kmatrix.dat"]);
    const kmatrix = run.artifacts.find((a: { name: string }) => a.name === "kmatrix.dat");
    const download = await sf.api("GET", `/api/runs/${run.id}/artifacts/${kmatrix.id}`);
    expect(download.body).toBe("K-matrix from CH4-td\n");

    const log = await sf.api("GET", `/api/runs/${run.id}/log`);
    const text = log.body.chunks.map((c: { text: string }) => c.text).join("");
    expect(text).toContain("target label: CH4-td");
    expect(text).toContain("[sigmaflow] all stages finished");
    const seqs = log.body.chunks.map((c: { seq: number }) => c.seq);
    expect(seqs).toEqual([...seqs].sort((a, b) => a - b));

    const ledger = await ledgerSum(run.id);
    expect(ledger.reserve).toBe(600);
    expect(ledger.release).toBe(600);
    expect(ledger.charge).toBe(Math.round(run.chargedCoreHours * 3600));
    expect(ledger.charge).toBeLessThan(600);
  });

  it("keeps hostile parameter values inside files and never runs them", async () => {
    const marker = path.join(host.rootDir, "pwned");
    const hostile = `'; touch pwned; echo '$(touch pwned)\`touch pwned\`"../../etc/passwd`;
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: hostile } }, "hostile"),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const run = await waitForState(sf, created.body.id, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    expect(existsSync(marker)).toBe(false);
    const orbitals = await readFile(
      path.join(host.rootDir, "runs", `sf-run-${run.id}`, "stage-1-prepare", "orbitals.dat"),
      "utf8",
    );
    expect(orbitals).toBe(`${hostile}\n`);
  });

  it("refuses parameters that do not fit the code's schema, and writes nothing", async () => {
    const before = await database.pool.query("select count(*)::int as n from runs");
    const bad = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: 42, extra: true } }),
    );
    expect(bad.status).toBe(422);
    expect(bad.body.error.details.map((d: { path: string }) => d.path)).toEqual(
      expect.arrayContaining([expect.stringContaining("spec.parameters.prepare")]),
    );
    const unknownStage = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { nosuch: {} }),
    );
    expect(unknownStage.status).toBe(422);
    const text = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "line\nbreak" } }),
    );
    expect(text.status).toBe(422);
    expect(text.body.error.message).toMatch(/notes\.txt/);
    const after = await database.pool.query("select count(*)::int as n from runs");
    expect(after.rows[0].n).toBe(before.rows[0].n);
  });

  it("marks a failing stage failed with its exit code and still charges what it used", async () => {
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "x" }, scatter: { exitCode: 3 } }, "fails"),
    );
    const run = await waitForState(sf, created.body.id, ["done", "failed"]);
    expect(run.state).toBe("failed");
    expect(run.exitCode).toBe(3);
    expect(run.stateMessage).toContain("exit code 3");
    const ledger = await ledgerSum(run.id);
    expect(ledger.release).toBe(ledger.reserve);
    expect(ledger.charge).toBeGreaterThanOrEqual(0);
  });
});

describe("cancel, resubmit and reuse", () => {
  it("cancels a running run through the scheduler and only then calls it cancelled", async () => {
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "long", sleepSeconds: 30 } }, "long"),
    );
    await waitForState(sf, created.body.id, ["running"]);
    const cancelled = await sf.api("POST", `/api/runs/${created.body.id}/cancel`);
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.cancelRequested).toBe(true);
    expect(cancelled.body.state).toBe("running");
    const run = await waitForState(sf, created.body.id, ["cancelled", "failed", "done"], 20_000);
    expect(run.state).toBe("cancelled");
    const again = await sf.api("POST", `/api/runs/${created.body.id}/cancel`);
    expect(again.status).toBe(409);
  });

  it("a queued run cancelled at once never starts and gets its reservation back", async () => {
    await sf.stopInProcessWorker();
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "never" } }, "never"),
    );
    const cancelled = await sf.api("POST", `/api/runs/${created.body.id}/cancel`);
    expect(cancelled.body.state).toBe("cancelled");
    const ledger = await ledgerSum(created.body.id);
    expect(ledger.release).toBe(ledger.reserve);
    sf.spawnWorker();
    await new Promise((resolve) => setTimeout(resolve, 3000));
    expect(existsSync(path.join(host.rootDir, "runs", `sf-run-${created.body.id}`))).toBe(false);
    const run = await sf.api("GET", `/api/runs/${created.body.id}`);
    expect(run.body.state).toBe("cancelled");
  });

  it("offers the results of an identical finished run and reuses them without spending allocation", async () => {
    const spec = runSpec(recipeId, hostId, { prepare: { label: "reuse-me" } }, "original");
    const first = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec);
    await waitForState(sf, first.body.id, ["done"]);
    const ask = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, { ...spec, onDuplicate: "ask" });
    expect(ask.status).toBe(409);
    expect(ask.body.error.details).toMatchObject({ reason: "reusable_result", runId: first.body.id });
    // Cores and wall time change the cost, not the result: still the same fingerprint.
    const reused = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: { ...spec.spec, resources: { cores: 2, wallTimeMinutes: 5 } },
      onDuplicate: "reuse",
    });
    expect(reused.status).toBe(201);
    expect(reused.body).toMatchObject({
      state: "done",
      reusedFrom: first.body.id,
      reservedCoreHours: 0,
      chargedCoreHours: 0,
    });
    const detail = await sf.api("GET", `/api/runs/${reused.body.id}`);
    expect(detail.body.artifacts).toHaveLength(2);
  });

  it("resubmits a run with changes as a new run linked to its origin", async () => {
    const first = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "v1" } }, "versioned"),
    );
    const again = await sf.api("POST", `/api/runs/${first.body.id}/resubmit`, {
      changes: { parameters: { prepare: { label: "v2" } } },
    });
    expect(again.status, JSON.stringify(again.body)).toBe(201);
    expect(again.body).toMatchObject({ resubmittedFrom: first.body.id, name: "versioned (again)" });
    expect(again.body.fingerprint).not.toBe(first.body.fingerprint);
    await waitForState(sf, again.body.id, ["done"]);
  });
});
