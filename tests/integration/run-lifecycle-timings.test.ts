/**
 * Per-symmetry timings and progress of a run whose codes take seconds per symmetry, so its log arrives
 * over many polls: each stage's lines must be read with that stage's output rules, whatever the last
 * progress line said. Two shell codes with different line formats stand in for real scattering codes
 * (one symmetry every 3 s, as a small target takes on a workstation).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
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

/** Longer than the poll interval, so each symmetry's lines arrive in a poll of their own. */
const SECONDS_PER_SYMMETRY = 3;
/** Sigmaflow's default poll interval (DEVELOPERS.md, worker settings), not the tests' quick 200 ms. */
const POLL_INTERVAL_MS = 2000;

let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let recipeId: string;

beforeAll(async () => {
  database = await createTestDatabase("timings");
  sf = await startSigmaflow(database, { inProcessWorker: false });
  sf.workerEnv.WORKER_POLL_INTERVAL_MS = String(POLL_INTERVAL_MS);
  sf.spawnWorker();
  host = await startFakeHost();
  hostId = await registerDevHost(sf, host);
  // Like a target-orbital code: "symmetry <irrep> done in <s> s" and "progress <done>/<total>".
  const orbitals = shellCode({
    name: "orbitals",
    script: [
      "n=0",
      "for sym in Ag B1u; do",
      `  sleep ${SECONDS_PER_SYMMETRY}`,
      `  echo "symmetry $sym done in ${SECONDS_PER_SYMMETRY}.00 s"`,
      "  n=$((n + 1))",
      '  echo "progress $n/2"',
      "done",
    ].join("\n"),
    outputRules: {
      timings: ["^symmetry (?<symmetry>\\S+) done in (?<seconds>[0-9.]+) s$"],
      progress: ["^progress (?<done>\\d+)/(?<total>\\d+)$"],
    },
  });
  // Like an inner-region code: a different line format for both timings and progress.
  const inner = shellCode({
    name: "inner",
    script: [
      "pct=0",
      "for irrep in B2u B3g; do",
      `  sleep ${SECONDS_PER_SYMMETRY}`,
      `  echo " IRREP $irrep   TIME=   ${SECONDS_PER_SYMMETRY}.50"`,
      "  pct=$((pct + 50))",
      '  echo " $pct% complete"',
      "done",
    ].join("\n"),
    outputRules: {
      timings: ["^ IRREP (?<symmetry>\\S+) +TIME= +(?<seconds>[0-9.]+)$"],
      progress: ["^ (?<percent>[0-9.]+)% complete$"],
    },
  });
  recipeId = await registerRecipe(sf, "slow-symmetries", [
    { name: "orbitals", code: orbitals },
    { name: "inner", code: inner },
  ]);
}, 60_000);

afterAll(async () => {
  await sf?.close();
  await host?.stop();
  await database?.drop();
});

describe("a run whose symmetries take seconds each", () => {
  // Regression: after a poll whose last progress line came from stage 1 and whose last stage marker
  // started stage 2, the next poll read stage 2's lines with stage 1's output rules and stored no timings.
  it("records every per-symmetry timing of both stages and reports its progress", async () => {
    const created = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: {
        name: "slow symmetries",
        recipeId,
        hostId,
        resources: { cores: 1, wallTimeMinutes: 5 },
      },
      onDuplicate: "run",
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);

    const running = await waitForState(sf, created.body.id, ["running", "done", "failed"]);
    expect(running.state, running.stateMessage).toBe("running");
    const run = await waitForState(sf, created.body.id, ["done", "failed"], 60_000);
    expect(run.state, run.stateMessage).toBe("done");

    // Each code prints the time it spent per symmetry; the table holds exactly those numbers, stage by
    // stage in the recipe's order, and within a stage as the D2h character table lists the irreps
    // (B3g before B2u; F. A. Cotton, "Chemical Applications of Group Theory", 3rd ed., Appendix IIA).
    expect(run.timings).toEqual([
      { stage: "orbitals", symmetry: "Ag", durationSeconds: SECONDS_PER_SYMMETRY },
      { stage: "orbitals", symmetry: "B1u", durationSeconds: SECONDS_PER_SYMMETRY },
      { stage: "inner", symmetry: "B3g", durationSeconds: SECONDS_PER_SYMMETRY + 0.5 },
      { stage: "inner", symmetry: "B2u", durationSeconds: SECONDS_PER_SYMMETRY + 0.5 },
    ]);
    // The last progress line came from the last stage: " 100% complete".
    expect(run.progress).toEqual({ stage: "inner", stageIndex: 2, stageCount: 2, percent: 100 });

    // The lines really arrived over several polls (otherwise this test would prove nothing).
    const log = await sf.api("GET", `/api/runs/${run.id}/log`);
    expect(log.body.chunks.length).toBeGreaterThanOrEqual(4);
  }, 90_000);
});
