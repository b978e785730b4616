/**
 * A researcher's runs through the whole engine on the development host (direct scheduler): a two-stage
 * recipe runs to `done`, logs and per-symmetry timings arrive, declared outputs are collected, the
 * ledger is charged and the reservation released; cancel, resubmit, reuse, hostile parameters, resources
 * from the codes' defaults.
 * Expected behaviour is Sigmaflow's run lifecycle (DEVELOPERS.md, run states).
 */
import { existsSync } from "node:fs";
import { readFile } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { shellCode } from "./support/code-fixtures";
import {
  type EngineScenario,
  type FakeHost,
  registerRecipe,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import type { TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

let scenario: EngineScenario;
let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let recipeId: string;

beforeAll(async () => {
  scenario = await startEngineScenario("lifecycle");
  ({ database, sf, host, hostId } = scenario);
  recipeId = await registerShellRecipe(sf);
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

/** States of the pg-boss items of one queue for a run (pg-boss keeps completed items for a while). */
async function queueItemStates(queue: string, runId: string): Promise<string[]> {
  const { rows } = await database.pool.query(
    "select state from pgboss.job where name = $1 and data->>'runId' = $2 order by created_on",
    [queue, runId],
  );
  return rows.map((row) => row.state);
}

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
    expect(run.timings[0].durationSeconds).toBeCloseTo(0.25, 6);
    const names = run.artifacts.map((a: { stage: string; name: string }) => `${a.stage}/${a.name}`).sort();
    expect(names).toEqual(["prepare/orbitals.dat", "scatter/kmatrix.dat"]);
    const kmatrix = run.artifacts.find((a: { name: string }) => a.name === "kmatrix.dat");
    const download = await sf.api("GET", `/api/runs/${run.id}/artifacts/${kmatrix.id}`);
    expect(download.body).toBe("K-matrix from CH4-td\n");

    const log = await sf.api("GET", `/api/runs/${run.id}/log`);
    const text = Buffer.concat(
      log.body.chunks.map((c: { dataBase64: string }) => Buffer.from(c.dataBase64, "base64")),
    ).toString("utf8");
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
  it("cancels a running run through the scheduler, only then calls it cancelled, and names who asked", async () => {
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
    // Regression: the history said "worker" for the cancel and never who asked for it.
    expect(run.cancelRequestedByName).toBe(sf.researcher.displayName);
    expect(run.events.at(-1)).toMatchObject({
      toState: "cancelled",
      actor: "user",
      actorName: sf.researcher.displayName,
    });
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
    // The stage item sent when the run was created is still queued; once the worker has taken it and
    // finished it (pg-boss marks it completed), staging had its chance and must have done nothing.
    await waitFor(
      "the worker to finish the run's stage item",
      () => queueItemStates("run-stage", created.body.id),
      (states) => states.length > 0 && states.every((state) => state === "completed"),
      { timeoutMs: 30_000 },
    );
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
    // Regression: the 409 did not say how to reuse the results or run anyway.
    expect(ask.body.error.details).toEqual({
      reason: "reusable_result",
      runId: first.body.id,
      runName: "original",
      onDuplicate: ["reuse", "run"],
    });
    expect(ask.body.error.message).toContain(first.body.id);
    expect(ask.body.error.message).toMatch(/onDuplicate "reuse".*"run"/);
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

  // Regression: a run that reused results showed an empty log.
  it("a run that reuses results serves the log of the run that produced them", async () => {
    const spec = runSpec(recipeId, hostId, { prepare: { label: "log-of-origin" } }, "origin");
    const first = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec);
    await waitForState(sf, first.body.id, ["done"]);
    const reused = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, { ...spec, onDuplicate: "reuse" });
    expect(reused.body.reusedFrom).toBe(first.body.id);
    const logText = async (runId: string) =>
      Buffer.concat(
        (await sf.api("GET", `/api/runs/${runId}/log`)).body.chunks.map((c: { dataBase64: string }) =>
          Buffer.from(c.dataBase64, "base64"),
        ),
      ).toString("utf8");
    const originalLog = await logText(first.body.id);
    expect(originalLog).toContain("target label: log-of-origin");
    expect(await logText(reused.body.id)).toBe(originalLog);

    // Reusing again points at the run that produced the results, not at the run that reused them.
    const again = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, { ...spec, onDuplicate: "reuse" });
    expect(again.body.reusedFrom).toBe(first.body.id);
    expect(await logText(again.body.id)).toBe(originalLog);
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

  // Regression: a resubmission replaced the original's parameters (and e-mail choice) with defaults, so a
  // code with a required parameter answered 422 and others silently ran with their default values.
  it("resubmits from the original spec exactly, changing only what the request names", async () => {
    // Without a worker the runs stay queued and are cancelled at the end: nothing runs, no e-mail goes out.
    sf.killWorkerHard();
    const original = {
      name: "kept",
      recipeId,
      hostId,
      parameters: { prepare: { label: "radius-25", sleepSeconds: 0.2 }, scatter: { exitCode: 0 } },
      resources: { cores: 2, wallTimeMinutes: 7 },
      notifyByEmail: true,
    };
    const first = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: original,
      onDuplicate: "run",
    });
    expect(first.status, JSON.stringify(first.body)).toBe(201);
    const specOf = async (runId: string) => (await sf.api("GET", `/api/runs/${runId}`)).body.spec;

    // What the runs page's Resubmit button sends.
    const button = await sf.api("POST", `/api/runs/${first.body.id}/resubmit`, { changes: {} });
    expect(button.status, JSON.stringify(button.body)).toBe(201);
    expect(await specOf(button.body.id)).toEqual({ ...original, name: "kept (again)" });
    expect(button.body.fingerprint).toBe(first.body.fingerprint);

    const renamed = await sf.api("POST", `/api/runs/${first.body.id}/resubmit`, {
      changes: { name: "copy" },
    });
    expect(renamed.status, JSON.stringify(renamed.body)).toBe(201);
    expect(await specOf(renamed.body.id)).toEqual({ ...original, name: "copy" });

    // One parameter of one stage, and one resource: everything else stays as it was.
    const tweaked = await sf.api("POST", `/api/runs/${first.body.id}/resubmit`, {
      changes: { parameters: { prepare: { sleepSeconds: 0.3 } }, resources: { cores: 3 } },
    });
    expect(tweaked.status, JSON.stringify(tweaked.body)).toBe(201);
    expect(await specOf(tweaked.body.id)).toEqual({
      ...original,
      name: "kept (again)",
      parameters: { prepare: { label: "radius-25", sleepSeconds: 0.3 }, scatter: { exitCode: 0 } },
      resources: { cores: 3, wallTimeMinutes: 7 },
    });
    expect(tweaked.body.fingerprint).not.toBe(first.body.fingerprint);

    // A parameter set to null is removed, so the code's default applies again (RFC 7396).
    const reverted = await sf.api("POST", `/api/runs/${first.body.id}/resubmit`, {
      changes: { parameters: { prepare: { sleepSeconds: null } } },
    });
    expect(reverted.status, JSON.stringify(reverted.body)).toBe(201);
    expect((await specOf(reverted.body.id)).parameters).toEqual({
      prepare: { label: "radius-25" },
      scatter: { exitCode: 0 },
    });
    for (const id of [first, button, renamed, tweaked, reverted].map((r) => r.body.id)) {
      expect((await sf.api("POST", `/api/runs/${id}/cancel`)).body.state).toBe("cancelled");
    }
    sf.spawnWorker();
  });
});

describe("resources", () => {
  // Regression: leaving resources out of a run was a 422 although every code declares default cores and
  // wall time.
  it("come from the codes' defaults when left out: most cores of any stage, wall times added up", async () => {
    const defaultsRecipeId = await registerRecipe(sf, "defaults", [
      { name: "target", code: shellCode({ name: "wide", defaults: { cores: 4, wallTimeMinutes: 30 } }) },
      { name: "inner", code: shellCode({ name: "long", defaults: { cores: 2, wallTimeMinutes: 45 } }) },
    ]);
    const spec = { name: "defaults", recipeId: defaultsRecipeId, hostId };

    const fromDefaults = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, { spec, onDuplicate: "run" });
    expect(fromDefaults.status, JSON.stringify(fromDefaults.body)).toBe(201);
    // max(4, 2) cores; 30 + 45 minutes, because the stages run one after another in one job.
    expect(fromDefaults.body).toMatchObject({ cores: 4, wallTimeMinutes: 75 });
    expect(fromDefaults.body.reservedCoreHours).toBeCloseTo((4 * 75) / 60, 4);
    const stored = await sf.api("GET", `/api/runs/${fromDefaults.body.id}`);
    expect(stored.body.spec.resources).toEqual({ cores: 4, wallTimeMinutes: 75 });

    const oneGiven = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: { ...spec, resources: { cores: 1 } },
      onDuplicate: "run",
    });
    expect(oneGiven.status, JSON.stringify(oneGiven.body)).toBe(201);
    expect(oneGiven.body).toMatchObject({ cores: 1, wallTimeMinutes: 75 });
    await waitForState(sf, fromDefaults.body.id, ["done", "failed"]);
    await waitForState(sf, oneGiven.body.id, ["done", "failed"]);
  });
});
