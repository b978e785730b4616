/**
 * The demo recipes through the whole engine: real psi4 (Debian's, 1.3.2) and the demo solver
 * (deploy/demo-codes/radial-scatter) run on the development host over SSH by the worker, the collected
 * files read by Sigmaflow and turned into results by the postprocess step.
 *
 * Checked against a source outside the project: the NIST Electron-Impact Cross Section database
 * (https://physics.nist.gov/PhysRefData/Ionization/, water, BEB total ionization cross section at
 * 100 eV: 2.348 Å²). That table's BEB uses the measured first ionization energy 12.61 eV for the 1b1
 * orbital. Here the orbitals come from RHF/aug-cc-pVDZ at the experimental geometry:
 *   - with Koopmans' binding energies throughout, the 1b1 binding energy is −ε(1b1) ≈ 13.9 eV instead of
 *     12.61 eV (Koopmans' theorem leaves out orbital relaxation and correlation), so the outermost
 *     orbital's threshold is higher and its cross section smaller: σ(100 eV) comes out about 6 % low
 *     (required within 10 %);
 *   - with the first ionization energy overridden by 12.61 eV, as the published table does, the only
 *     difference left is the basis set's orbital kinetic energies and inner binding energies: within 1 %.
 * aug-cc-pVDZ is the medium basis of choice because the diffuse functions describe the outer orbitals'
 * kinetic energies; cc-pVDZ without them is about 2.5 % high with the override (measured here, not asserted).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hfOrbitalsCode } from "../../deploy/demo/codes/psi4-orbitals";
import { radialScatterCode } from "../../deploy/demo/codes/radial-scatter";
import { DEMO_TARGETS } from "../../deploy/demo/targets";
import type { Result, RunResults } from "../../shared/schemas/results";
import {
  type EngineScenario,
  type Sigmaflow,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { waitFor } from "./support/wait-for";

/** NIST Electron-Impact Cross Section database, H2O, BEB σ_total at T = 100 eV, Å². */
const NIST_WATER_BEB_100_EV_A2 = 2.348;
/** The measured first (adiabatic) ionization energy of water the NIST table uses, eV. */
const WATER_FIRST_IONIZATION_EV = 12.61;

let scenario: EngineScenario;
let sf: Sigmaflow;
let waterId: string;
let ionizationRecipeId: string;
let elasticRecipeId: string;

async function register(path: string, body: unknown): Promise<string> {
  const response = await sf.api("POST", path, body);
  expect(response.status, JSON.stringify(response.body)).toBe(201);
  return response.body.id as string;
}

async function submit(name: string, recipeId: string, parameters: Record<string, Record<string, unknown>>) {
  const response = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
    spec: { name, recipeId, hostId: scenario.hostId, targetId: waterId, parameters },
    onDuplicate: "run",
  });
  expect(response.status, JSON.stringify(response.body)).toBe(201);
  return response.body.id as string;
}

async function derivedResults(runId: string): Promise<RunResults> {
  const run = await waitForState(sf, runId, ["done", "failed", "cancelled"], 180_000);
  expect(run.state, run.stateMessage).toBe("done");
  const response = await waitFor(
    `results of run ${runId}`,
    () => sf.api("GET", `/api/runs/${runId}/results`),
    (r) => r.body?.state !== "pending" && r.body?.state !== null,
    { timeoutMs: 60_000 },
  );
  expect(response.body.state, response.body.message).toBe("derived");
  return response.body as RunResults;
}

function find(results: RunResults, kind: string, process: string, irrep: string | null = null): Result {
  const found = results.results.find(
    (r) => r.kind === kind && r.process === process && r.irrep === irrep && r.label === "",
  );
  expect(found, `${kind}/${process}/${irrep ?? "sum"} in ${results.results.length} results`).toBeDefined();
  return found!;
}

function valueAt(result: Result, x: number, xColumn: string, yColumn: string): number {
  const xs = result.columns[xColumn]!;
  const index = xs.indexOf(x);
  expect(index, `${xColumn} = ${x} is one of the result's points`).toBeGreaterThanOrEqual(0);
  return result.columns[yColumn]![index]!;
}

beforeAll(async () => {
  scenario = await startEngineScenario("demorecipes");
  sf = scenario.sf;
  const water = DEMO_TARGETS.find((t) => t.name === "Water")!;
  waterId = await register(`/api/groups/${sf.groupId}/targets`, water);
  const orbitalsCodeId = await register(`/api/groups/${sf.groupId}/codes`, hfOrbitalsCode);
  const scatterCodeId = await register(`/api/groups/${sf.groupId}/codes`, radialScatterCode);
  ionizationRecipeId = await register(`/api/groups/${sf.groupId}/recipes`, {
    name: "orbitals-to-ionization",
    stages: [{ name: "orbitals", codeId: orbitalsCodeId }],
  });
  elasticRecipeId = await register(`/api/groups/${sf.groupId}/recipes`, {
    name: "orbitals-to-elastic",
    stages: [
      { name: "orbitals", codeId: orbitalsCodeId },
      { name: "scatter", codeId: scatterCodeId },
    ],
  });
}, 120_000);

afterAll(async () => {
  await scenario?.close();
});

describe("orbitals → ionization (psi4 → BEB)", () => {
  let firstRunId: string;

  it("gives water's BEB total ionization cross section at 100 eV within 10 % of the NIST database", async () => {
    firstRunId = await submit("water BEB", ionizationRecipeId, { orbitals: { basis: "aug-cc-pvdz" } });
    const results = await derivedResults(firstRunId);
    const total = find(results, "cross-section", "ionization");
    const sigma = valueAt(total, 100, "energy_eV", "cross_section_A2");
    expect(Math.abs(sigma - NIST_WATER_BEB_100_EV_A2) / NIST_WATER_BEB_100_EV_A2).toBeLessThan(0.1);
    // Koopmans' binding energy of 1b1 is above the measured 12.61 eV, so the cross section is low.
    expect(sigma).toBeLessThan(NIST_WATER_BEB_100_EV_A2);
    const rates = find(results, "rate-coefficient", "ionization");
    expect(rates.fit).not.toBeNull();
    expect(rates.columnOrder).toEqual(["temperature_K", "rate_cm3_per_s"]);
  }, 240_000);

  it("is within 1 % once the first ionization energy is the measured 12.61 eV (a resubmission that reuses the run)", async () => {
    const response = await sf.api("POST", `/api/runs/${firstRunId}/resubmit`, {
      changes: { analysis: { firstIonizationEnergyEv: WATER_FIRST_IONIZATION_EV } },
      onDuplicate: "reuse",
    });
    expect(response.status, JSON.stringify(response.body)).toBe(201);
    expect(response.body.reusedFrom).toBe(firstRunId);
    const results = await derivedResults(response.body.id);
    const sigma = valueAt(find(results, "cross-section", "ionization"), 100, "energy_eV", "cross_section_A2");
    expect(Math.abs(sigma - NIST_WATER_BEB_100_EV_A2) / NIST_WATER_BEB_100_EV_A2).toBeLessThan(0.01);
    expect(find(results, "cross-section", "ionization").method).toContain("12.61");
  }, 240_000);
});

describe("orbitals → elastic (psi4 → demo solver → cross sections)", () => {
  it("derives per-irrep and summed elastic cross sections, momentum transfer, eigenphase sums and rates", async () => {
    const runId = await submit("water elastic", elasticRecipeId, {
      orbitals: { basis: "cc-pvdz" },
      scatter: { polarizabilityBohr3: 9.8, lmax: 4 },
    });
    const results = await derivedResults(runId);
    const irreps = ["A1", "A2", "B1", "B2"];
    const summed = find(results, "cross-section", "elastic");
    const perIrrep = irreps.map((irrep) => find(results, "cross-section", "elastic", irrep));
    // The summed cross section is the sum over the irreducible representations, energy by energy.
    summed.columns.cross_section_A2!.forEach((sigma, i) => {
      const sum = perIrrep.reduce((acc, r) => acc + r.columns.cross_section_A2![i]!, 0);
      expect(Math.abs(sigma - sum)).toBeLessThanOrEqual(1e-9 * Math.max(1, sigma));
      expect(sigma).toBeGreaterThan(0);
    });
    expect(find(results, "cross-section", "momentum-transfer").columns.cross_section_A2!.length).toBe(
      summed.columns.cross_section_A2!.length,
    );
    for (const irrep of irreps) expect(find(results, "eigenphase-sum", "elastic", irrep)).toBeDefined();
    expect(find(results, "rate-coefficient", "elastic").fit).not.toBeNull();
    expect(summed.method).toContain("teaching-grade");
    // The solver's per-symmetry timing lines reached the run through its output rules.
    const run = await sf.api("GET", `/api/runs/${runId}`);
    const timed = (run.body.timings as { stage: string; symmetry: string }[])
      .filter((t) => t.stage === "scatter")
      .map((t) => t.symmetry)
      .sort();
    expect(timed).toEqual(irreps);
  }, 240_000);
});
