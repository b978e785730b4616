/**
 * A host's limit of runs at once (max_concurrent_runs): more runs than slots are submitted together;
 * the extra ones wait `queued` with a message saying why, start as slots free up, and all finish. The
 * limit is checked on committed run states sampled while the runs go through (a run holds a slot from
 * `staging` until it is settled) and on the jobs' own start and end times on the host.
 */
import { readFile } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  type EngineScenario,
  type FakeHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import type { TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

const LIMIT = 2;
const RUNS = 6;

let scenario: EngineScenario;
let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let recipeId: string;

beforeAll(async () => {
  scenario = await startEngineScenario("hostlimit", {
    host: { name: "narrow-host", maxConcurrentRuns: LIMIT },
  });
  ({ database, sf, host, hostId } = scenario);
  recipeId = await registerShellRecipe(sf, "limited");
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

/**
 * Samples, every 20 ms until stopped, how many of the runs hold a slot (committed states from staging to
 * collecting): a reading of committed rows can only under-count, so a maximum above the limit is a real
 * violation.
 */
function sampleSlotHolders(runIds: string[]) {
  let most = 0;
  let running = true;
  const done = (async () => {
    while (running) {
      const { rows } = await database.pool.query(
        "select count(*)::int as n from runs where id = any($1) and state in ('staging', 'submitted', 'running', 'collecting')",
        [runIds],
      );
      most = Math.max(most, rows[0].n);
      await new Promise((resolve) => setTimeout(resolve, 20));
    }
  })();
  return {
    async stop() {
      running = false;
      await done;
      return most;
    },
  };
}

/** Most jobs running on the host at the same instant, from the start and end times each job recorded. */
async function mostJobsAtOnce(runIds: string[]): Promise<number> {
  const marks: [number, number][] = [];
  for (const id of runIds) {
    const dir = path.join(host.rootDir, "runs", `sf-run-${id}`);
    marks.push([Number.parseFloat(await readFile(path.join(dir, "job.started"), "utf8")), 1]);
    marks.push([Number.parseFloat(await readFile(path.join(dir, "job.ended"), "utf8")), -1]);
  }
  marks.sort((x, y) => x[0] - y[0] || x[1] - y[1]);
  let current = 0;
  let most = 0;
  for (const [, step] of marks) {
    current += step;
    most = Math.max(most, current);
  }
  return most;
}

describe("a host that runs at most two runs at once", () => {
  it("keeps the extra runs queued with a reason, then runs them all", async () => {
    const ids: string[] = [];
    const sampler = sampleSlotHolders(ids);
    const created = await Promise.all(
      Array.from({ length: RUNS }, async (_, i) => {
        const created = await sf.api(
          "POST",
          `/api/groups/${sf.groupId}/runs`,
          runSpec(recipeId, hostId, { prepare: { label: `limited-${i}`, sleepSeconds: 1 } }, `limited-${i}`),
        );
        expect(created.status, JSON.stringify(created.body)).toBe(201);
        return created.body.id as string;
      }),
    );
    ids.push(...created);
    // Six runs of at least 1 s on two slots: four of them wait, the last two for at least 2 s. The row
    // is read as it is while it waits (once it has a slot its message says so instead).
    const waiting = await waitFor(
      "one of the runs to wait queued for a slot",
      async () => {
        const { rows } = await database.pool.query(
          "select state, state_message from runs where id = any($1) and waiting_for_slot_since is not null limit 1",
          [ids],
        );
        return rows[0] as { state: string; state_message: string } | undefined;
      },
      (row) => row !== undefined,
      { timeoutMs: 15_000, intervalMs: 20 },
    );
    expect(waiting).toEqual({
      state: "queued",
      state_message: "Waiting for a free slot: narrow-host runs at most 2 at once",
    });
    for (const id of ids) {
      const run = await waitForState(sf, id, ["done", "failed", "cancelled"], 60_000);
      expect(run.state, run.stateMessage).toBe("done");
    }
    expect(await sampler.stop()).toBeLessThanOrEqual(LIMIT);
    // The limit was used, not just respected: two jobs ran side by side on the host.
    expect(await mostJobsAtOnce(ids)).toBe(LIMIT);
    const { rows } = await database.pool.query(
      "select count(*)::int as n from runs where id = any($1) and waiting_for_slot_since is not null",
      [ids],
    );
    expect(rows[0].n).toBe(0);
  });

  it("cancels a run that waits for a slot at once, and it no longer waits", async () => {
    const submit = async (label: string, sleepSeconds: number) => {
      const created = await sf.api(
        "POST",
        `/api/groups/${sf.groupId}/runs`,
        runSpec(recipeId, hostId, { prepare: { label, sleepSeconds } }, label),
      );
      expect(created.status, JSON.stringify(created.body)).toBe(201);
      return created.body.id as string;
    };
    const busy = [await submit("busy-1", 4), await submit("busy-2", 4)];
    for (const id of busy) await waitForState(sf, id, ["running"], 15_000);
    const ids = [...busy, await submit("waiting", 0)];
    const waitingId = ids[2]!;
    // The two busy runs hold both slots for 4 s: the third one must wait.
    await waitFor(
      "the third run to wait for a slot",
      () => sf.api("GET", `/api/runs/${waitingId}`),
      (r) => /^Waiting for a free slot/.test(r.body.stateMessage ?? ""),
      { timeoutMs: 15_000 },
    );
    const cancelled = await sf.api("POST", `/api/runs/${waitingId}/cancel`);
    expect(cancelled.status, JSON.stringify(cancelled.body)).toBe(200);
    expect(cancelled.body.state).toBe("cancelled");
    const { rows } = await database.pool.query("select waiting_for_slot_since from runs where id = $1", [
      waitingId,
    ]);
    expect(rows[0].waiting_for_slot_since).toBeNull();
    for (const id of ids.slice(0, 2)) {
      const run = await waitForState(sf, id, ["done", "failed", "cancelled"], 60_000);
      expect(run.state, run.stateMessage).toBe("done");
    }
  });
});
