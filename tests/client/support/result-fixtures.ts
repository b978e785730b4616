import { RESULTS_CAUTION, type Result, type RunResults } from "@shared/schemas";
import { RUN_IDS } from "./run-fixtures";

/**
 * Results of the Kestrel group's finished elastic run as the API returns them (shared/schemas/results.ts).
 * The numbers are made up for display: the client tests check that they are shown as given (units,
 * significant digits, what a logarithmic axis leaves out), not that they are physically right.
 */
const CREATED = "2026-11-29T18:01:00.000Z";
const DEMO_METHOD =
  "Sigmaflow demo solver: static-exchange model potential, partial waves to l = 4 (a teaching-grade model, not a production calculation).";

function result(overrides: Partial<Result> & Pick<Result, "id" | "kind" | "process">): Result {
  return {
    runId: RUN_IDS.done,
    irrep: null,
    label: "",
    columns: {},
    columnOrder: [],
    fit: null,
    method: DEMO_METHOD,
    createdAt: CREATED,
    ...overrides,
  };
}

const ENERGIES_EV = [0.1, 1, 10];

export const elasticSum = result({
  id: "7e50c000-0000-4000-8000-000000000001",
  kind: "cross-section",
  process: "elastic",
  columns: { energy_eV: ENERGIES_EV, cross_section_A2: [12.5, 8.25, 3.1] },
  columnOrder: ["energy_eV", "cross_section_A2"],
});

export const elasticA1 = result({
  id: "7e50c000-0000-4000-8000-000000000002",
  kind: "cross-section",
  process: "elastic",
  irrep: "A1",
  columns: { energy_eV: ENERGIES_EV, cross_section_A2: [10, 6, 3.1] },
  columnOrder: ["energy_eV", "cross_section_A2"],
});

/** Its last value is 0: a logarithmic axis cannot show it, the table still does. */
export const elasticB2 = result({
  id: "7e50c000-0000-4000-8000-000000000003",
  kind: "cross-section",
  process: "elastic",
  irrep: "B2",
  columns: { energy_eV: ENERGIES_EV, cross_section_A2: [2.5, 2.25, 0] },
  columnOrder: ["energy_eV", "cross_section_A2"],
});

export const elasticRate = result({
  id: "7e50c000-0000-4000-8000-000000000004",
  kind: "rate-coefficient",
  process: "elastic",
  columns: { temperature_K: [1000, 10_000, 100_000], rate_cm3_per_s: [1.2e-8, 3.4e-8, 5.6e-8] },
  columnOrder: ["temperature_K", "rate_cm3_per_s"],
  fit: {
    alpha_cm3_per_s: 2.5e-9,
    beta: 0.5,
    gamma_K: 120,
    minTemperatureK: 1000,
    maxTemperatureK: 100_000,
    maxRelativeDeviation: 0.031,
  },
});

export function derivedResults(): RunResults {
  return {
    runId: RUN_IDS.done,
    state: "derived",
    message: null,
    caution: RESULTS_CAUTION,
    // Rates first and parts before their sum: the page orders them itself.
    results: [elasticRate, elasticA1, elasticB2, elasticSum],
  };
}

const BEB_MODEL = "Binary-Encounter-Bethe model, from the run's orbital table";

/** BEB ionization: the total over orbitals and each orbital's part, with its own B, U, N in its method. */
export const ionizationTotal = result({
  id: "7e50c000-0000-4000-8000-000000000011",
  kind: "cross-section",
  process: "ionization",
  columns: { energy_eV: [15, 100, 1000], cross_section_A2: [0.05, 2.1, 0.9] },
  columnOrder: ["energy_eV", "cross_section_A2"],
  method: `${BEB_MODEL}; sum over 2 occupied orbitals.`,
});
export const ionization1b1 = result({
  id: "7e50c000-0000-4000-8000-000000000012",
  kind: "cross-section",
  process: "ionization",
  irrep: "B1",
  label: "1b1",
  columns: { energy_eV: [15, 100, 1000], cross_section_A2: [0.05, 1.2, 0.5] },
  columnOrder: ["energy_eV", "cross_section_A2"],
  method: `${BEB_MODEL}; orbital 1b1: B = 13.85 eV, U = 59.52 eV, N = 2.`,
});
export const ionization3a1 = result({
  id: "7e50c000-0000-4000-8000-000000000013",
  kind: "cross-section",
  process: "ionization",
  irrep: "A1",
  label: "3a1",
  columns: { energy_eV: [15, 100, 1000], cross_section_A2: [0, 0.9, 0.4] },
  columnOrder: ["energy_eV", "cross_section_A2"],
  method: `${BEB_MODEL}; orbital 3a1: B = 15.87 eV, U = 61.91 eV, N = 2.`,
});

function orbital(id: string, irrep: string, label: string, values: [number, number, number, number]) {
  return result({
    id,
    kind: "orbital-table",
    process: "orbitals",
    irrep,
    label,
    columns: {
      orbital_energy_eV: [values[0]],
      binding_energy_eV: [values[1]],
      kinetic_energy_eV: [values[2]],
      occupation_electrons: [values[3]],
    },
    columnOrder: ["orbital_energy_eV", "binding_energy_eV", "kinetic_energy_eV", "occupation_electrons"],
    method: "Orbital energies from the run's orbital table; B = −ε (Koopmans' theorem, common practice).",
  });
}
export const orbitals = [
  orbital("7e50c000-0000-4000-8000-000000000021", "B1", "1b1", [-13.85, 13.85, 59.52, 2]),
  orbital("7e50c000-0000-4000-8000-000000000022", "A1", "3a1", [-15.87, 15.87, 61.91, 2]),
];

export function ionizationResults(): RunResults {
  return { ...derivedResults(), results: [...orbitals, ionization1b1, ionizationTotal, ionization3a1] };
}
