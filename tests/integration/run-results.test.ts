/**
 * Results through the whole engine: a code declares result files, its run on the development host writes
 * them, collect stores them and the postprocess step derives results, which GET /api/runs/:runId/results
 * returns. Checked against the science core on the same inputs (BEB of the orbitals the run wrote), and
 * for Sigmaflow's own rules: a malformed file leaves the run done with its results failed and its files
 * downloadable; repeating postprocess never duplicates rows; a run that reuses results gets its own.
 *
 * The orbitals are a real psi4 1.3.2 RHF/cc-pVDZ run of water (tests/unit/results/fixtures, written by the
 * demo code hf-orbitals); the K-matrices are made up (a spherical potential's s and p waves).
 */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createLogger } from "../../server/logger";
import { createBoss, RUN_STEP_QUEUES } from "../../server/queue/queues";
import { RESULTS_CAUTION } from "../../shared/schemas/results";
import { HARTREE_EV } from "../../shared/science/constants";
import { bebCrossSections } from "../../shared/science/ionization";
import { loadWorkerConfig } from "../../worker/config";
import type { WorkerContext } from "../../worker/context";
import { readOrbitalTable } from "../../worker/results/readers/orbital-table";
import { postprocessRun } from "../../worker/steps/postprocess";
import { shellCode, uniqueCodeName } from "./support/code-fixtures";
import {
  type EngineScenario,
  registerRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { waitFor } from "./support/wait-for";

const ORBITALS = readFileSync(
  fileURLToPath(new URL("../unit/results/fixtures/water-cc-pvdz.orbitals.txt", import.meta.url)),
  "utf8",
);

/** Made-up K-matrices of a spherical potential: s (A1) and p (A1, B1, B2) waves, K = diag(tan δ_l). */
function kMatrices(): string {
  const energies = [0.5, 1, 2, 5, 10, 20];
  const delta = (l: number, e: number) => (l === 0 ? -0.4 - 0.05 * e : 0.1 * Math.sqrt(e));
  const irreps: [string, [number, number][]][] = [
    [
      "A1",
      [
        [0, 0],
        [1, 0],
      ],
    ],
    ["A2", []],
    ["B1", [[1, 1]]],
    ["B2", [[1, -1]]],
  ];
  const lines = [
    "format sigmaflow-kmatrix 1",
    "model test potential (teaching-grade model)",
    "target_spin_multiplicity 1",
  ];
  for (const [irrep, channels] of irreps) {
    lines.push(`irrep ${irrep} total_spin_multiplicity 2 channels ${channels.length}`);
    channels.forEach(([l, m], i) => {
      lines.push(`channel ${i + 1} ${l} ${m}`);
    });
    for (const e of channels.length === 0 ? [] : energies) {
      const k = channels.flatMap(([l], r) => channels.map((_, c) => (r === c ? Math.tan(delta(l, e)) : 0)));
      lines.push(`energy ${e} ${k.join(" ")}`);
    }
    lines.push("end irrep");
  }
  return `${lines.join("\n")}\n`;
}

/** A one-stage recipe whose code writes both files and declares them as result files. */
async function resultsRecipe(sf: Sigmaflow, orbitals: string): Promise<string> {
  const script = [
    "cat > orbitals.txt <<'SF_END'",
    orbitals.trimEnd(),
    "SF_END",
    "cat > kmatrices.txt <<'SF_END'",
    kMatrices().trimEnd(),
    "SF_END",
    "",
  ].join("\n");
  const name = uniqueCodeName("solver");
  return registerRecipe(sf, `${name}-recipe`, [
    {
      name: "solve",
      code: shellCode({
        name,
        script,
        outputFiles: ["orbitals.txt", "kmatrices.txt"],
        resultFiles: [
          { fileName: "orbitals.txt", reader: "orbital-table" },
          { fileName: "kmatrices.txt", reader: "kmatrix-table" },
        ],
      }),
    },
  ]);
}

let scenario: EngineScenario;
let sf: Sigmaflow;
let hostId: string;

beforeAll(async () => {
  scenario = await startEngineScenario("results");
  ({ sf, hostId } = scenario);
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

type Row = {
  id: string;
  kind: string;
  process: string;
  irrep: string | null;
  label: string;
  columns: Record<string, number[]>;
  columnOrder: string[];
  fit: unknown;
  method: string;
};

/** The run's results once postprocess has settled them. */
async function settledResults(runId: string) {
  const response = await waitFor(
    `the results of run ${runId} to be settled`,
    () => sf.api("GET", `/api/runs/${runId}/results`),
    (r) => r.status === 200 && r.body.state !== "pending" && r.body.state !== null,
  );
  return response.body as { state: string; message: string | null; caution: string; results: Row[] };
}

async function sendPostprocess(runId: string) {
  const boss = createBoss(scenario.database.url, { maintenance: false });
  await boss.start();
  try {
    await boss.send(RUN_STEP_QUEUES.postprocess, { runId });
  } finally {
    await boss.stop({ graceful: false, wait: true });
  }
}

const rowIds = (results: Row[]) => results.map((r) => r.id).sort();

describe("results of a run whose code declares result files", () => {
  let recipeId: string;
  let runId: string;

  beforeAll(async () => {
    recipeId = await resultsRecipe(sf, ORBITALS);
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { solve: {} }, "water"),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    runId = created.body.id;
    const run = await waitForState(sf, runId, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
  }, 60_000);

  it("derives cross sections, eigenphase sums, rates and the orbital table, units in the column names", async () => {
    const body = await settledResults(runId);
    expect(body.state, body.message ?? "").toBe("derived");
    expect(body.caution).toBe(RESULTS_CAUTION);
    const kinds = body.results.map((r) => r.kind);
    expect(kinds.indexOf("eigenphase-sum")).toBeGreaterThan(kinds.lastIndexOf("cross-section"));
    expect(kinds.indexOf("rate-coefficient")).toBeGreaterThan(kinds.lastIndexOf("eigenphase-sum"));
    expect(kinds.indexOf("orbital-table")).toBeGreaterThan(kinds.lastIndexOf("rate-coefficient"));
    const summary = new Set(
      body.results.filter((r) => r.irrep === null).map((r) => `${r.kind}/${r.process}`),
    );
    expect(summary).toEqual(
      new Set([
        "cross-section/elastic",
        "cross-section/momentum-transfer",
        "cross-section/ionization",
        "eigenphase-sum/elastic",
        "rate-coefficient/elastic",
        "rate-coefficient/momentum-transfer",
        "rate-coefficient/ionization",
        "target-properties/orbitals",
      ]),
    );
    expect(kinds.indexOf("target-properties")).toBeGreaterThan(kinds.lastIndexOf("orbital-table"));
    for (const row of body.results) {
      expect(row.columnOrder.length).toBeGreaterThan(0);
      for (const name of row.columnOrder)
        expect(name).toMatch(/_(eV|A2|rad|K|cm3_per_s|electrons|hartree|D|cm1)$/);
    }
    const rate = body.results.find((r) => r.kind === "rate-coefficient" && r.process === "ionization")!;
    expect(rate.columnOrder).toEqual(["temperature_K", "rate_cm3_per_s"]);
    expect(rate.fit).toMatchObject({
      minTemperatureK: expect.any(Number),
      maxRelativeDeviation: expect.any(Number),
    });
    const orbitals = body.results.filter((r) => r.kind === "orbital-table");
    expect(orbitals.map((r) => r.label)).toEqual(["1a1", "2a1", "1b2", "3a1", "1b1"]);
    expect(body.results.find((r) => r.process === "elastic")!.method).toMatch(/teaching-grade model/);
  });

  it("the BEB total at 100 eV equals the science core's value for the orbitals the run wrote", async () => {
    const body = await settledResults(runId);
    const total = body.results.find(
      (r) => r.kind === "cross-section" && r.process === "ionization" && r.irrep === null,
    )!;
    const index = total.columns.energy_eV!.indexOf(100);
    expect(index).toBeGreaterThan(0);
    // The science core on the same orbitals: B = −ε, U = kinetic energy, N = occupation (neutral: no target).
    const occupied = readOrbitalTable(ORBITALS).orbitals.filter((o) => o.occupation > 0);
    const expected = bebCrossSections({
      orbitals: occupied.map((o) => ({
        bindingEv: -o.energyHartree * HARTREE_EV,
        kineticEv: o.kineticHartree * HARTREE_EV,
        occupation: o.occupation,
      })),
      energiesEv: [100],
    }).totalA2[0]!;
    expect(total.columns.cross_section_A2![index]).toBeCloseTo(expected, 10);
    expect(total.method).toMatch(/the run names no target, so its charge is taken as 0/);
  });

  it("postprocess again never duplicates rows: a settled run is left alone, a pending one is replaced", async () => {
    const before = rowIds((await settledResults(runId)).results);
    await sendPostprocess(runId);
    // Wait until the queue has handled the item (pg-boss marks it completed), then compare.
    await waitFor(
      "the repeated postprocess item to complete",
      async () =>
        (
          await scenario.database.pool.query(
            "select count(*)::int as n from pgboss.job where name = $1 and data->>'runId' = $2 and state = 'completed'",
            [RUN_STEP_QUEUES.postprocess, runId],
          )
        ).rows[0].n as number,
      (n: number) => n >= 2,
    );
    expect(rowIds((await settledResults(runId)).results)).toEqual(before);

    await scenario.database.pool.query("update runs set results_state = 'pending' where id = $1", [runId]);
    await sendPostprocess(runId);
    const again = await settledResults(runId);
    expect(again.state).toBe("derived");
    expect(again.results).toHaveLength(before.length);
    expect(rowIds(again.results)).not.toEqual(before);
    const { rows } = await scenario.database.pool.query(
      "select count(*)::int as n from run_results where run_id = $1",
      [runId],
    );
    expect(rows[0].n).toBe(before.length);
  });

  it("a run that reuses the results gets its own, from the reused run's collected files", async () => {
    const original = await settledResults(runId);
    const reused = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      ...runSpec(recipeId, hostId, { solve: {} }, "water again"),
      onDuplicate: "reuse",
    });
    expect(reused.status, JSON.stringify(reused.body)).toBe(201);
    expect(reused.body.reusedFrom).toBe(runId);
    const body = await settledResults(reused.body.id);
    expect(body.state).toBe("derived");
    expect(body.results.map((r) => `${r.kind}/${r.process}/${r.irrep}/${r.label}`)).toEqual(
      original.results.map((r) => `${r.kind}/${r.process}/${r.irrep}/${r.label}`),
    );
  });
});

describe("a run whose result file is malformed", () => {
  it("is done, its results failed with the reader's reason, its collected files still downloadable", async () => {
    const broken = ORBITALS.replace(/^1b1 B1 1 .*$/m, "1b1 B1 1 -0.49 two 2.27");
    const line = broken.split("\n").findIndex((l) => l.startsWith("1b1 ")) + 1;
    const recipeId = await resultsRecipe(sf, broken);
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { solve: {} }, "broken"),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const run = await waitForState(sf, created.body.id, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    const body = await settledResults(run.id);
    expect(body.state).toBe("failed");
    expect(body.message).toBe(
      `results could not be derived: orbitals.txt, line ${line}: occupation "two" is not a finite number`,
    );
    expect(body.results).toEqual([]);
    const detail = await sf.api("GET", `/api/runs/${run.id}`);
    expect(detail.body.state).toBe("done");
    expect(detail.body.resultsState).toBe("failed");
    const orbitals = detail.body.artifacts.find((a: { name: string }) => a.name === "orbitals.txt");
    const download = await sf.api("GET", `/api/runs/${run.id}/artifacts/${orbitals.id}`);
    expect(download.status).toBe(200);
    expect(download.body).toBe(`${broken.trimEnd()}\n`);
  });

  it("a run whose codes declare no result files has none, and says so", async () => {
    const name = uniqueCodeName("plain");
    const recipeId = await registerRecipe(sf, `${name}-recipe`, [
      { name: "only", code: shellCode({ name }) },
    ]);
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { only: {} }, "plain"),
    );
    const run = await waitForState(sf, created.body.id, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    const body = await settledResults(run.id);
    expect(body.state).toBe("none");
    expect(body.message).toMatch(/No code of the recipe declares result files/);
  });

  it("answers 404 for a run that does not exist", async () => {
    const response = await sf.api("GET", "/api/runs/00000000-0000-4000-8000-000000000000/results");
    expect(response.status).toBe(404);
  });
});

describe("a derivation past the worker's time limit", () => {
  it("is stopped: results failed saying so, the run done, its files kept; within the limit it derives", async () => {
    const recipeId = await resultsRecipe(sf, ORBITALS);
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { solve: {} }, "slow results"),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const runId = created.body.id as string;
    const run = await waitForState(sf, runId, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    const derived = await settledResults(runId);
    expect(derived.state).toBe("derived");

    // The step itself, run with a 1 ms limit (no item is sent, so the test's worker leaves the run alone).
    const settings = loadWorkerConfig(sf.workerEnv as never);
    const ctx = (timeoutMs: number) =>
      ({
        db: scenario.database.db,
        config: { ...settings, postprocess: { ...settings.postprocess, timeoutMs } },
        log: createLogger("silent"),
      }) as unknown as WorkerContext;
    await scenario.database.pool.query("update runs set results_state = 'pending' where id = $1", [runId]);
    await postprocessRun(ctx(1), runId);
    const failed = await settledResults(runId);
    expect(failed.state).toBe("failed");
    expect(failed.message).toBe("results could not be derived: deriving took longer than 0.001 s");
    expect(failed.results).toEqual([]);
    const detail = await sf.api("GET", `/api/runs/${runId}`);
    expect(detail.body.state).toBe("done");
    expect(detail.body.artifacts.map((a: { name: string }) => a.name)).toEqual(
      expect.arrayContaining(["orbitals.txt", "kmatrices.txt"]),
    );

    await scenario.database.pool.query("update runs set results_state = 'pending' where id = $1", [runId]);
    await postprocessRun(ctx(60_000), runId);
    const again = await settledResults(runId);
    expect(again.state).toBe("derived");
    expect(again.results.map((r) => `${r.kind}/${r.process}/${r.irrep}/${r.label}`)).toEqual(
      derived.results.map((r) => `${r.kind}/${r.process}/${r.irrep}/${r.label}`),
    );
  });
});
