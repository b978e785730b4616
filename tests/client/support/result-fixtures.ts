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

/** Made-up target properties of an orbitals calculation (one row of single values). */
export const targetProperties = result({
  id: "7e50c000-0000-4000-8000-000000000031",
  kind: "target-properties",
  process: "orbitals",
  columnOrder: ["total_energy_hartree", "dipole_z_D", "dipole_magnitude_D", "rotational_constant_a_cm1"],
  columns: {
    total_energy_hartree: [-76.02],
    dipole_z_D: [-2.057],
    dipole_magnitude_D: [2.057],
    rotational_constant_a_cm1: [27.38],
  },
  method:
    "psi4 1.3.2 rhf/cc-pvdz (c2v) from orbitals.txt of stage orbitals: dipole about the centre of mass.",
});

export function ionizationResults(): RunResults {
  return {
    ...derivedResults(),
    results: [...orbitals, ionization1b1, ionizationTotal, ionization3a1, targetProperties],
  };
}

/** n values from `from` to `to` evenly spaced on a logarithmic scale, as the postprocess step samples. */
function logSpaced(from: number, to: number, n: number): number[] {
  return Array.from({ length: n }, (_, i) => from * (to / from) ** (i / (n - 1)));
}

/**
 * Results shaped like those of the demo water runs (elastic chain and BEB together), for what the page
 * does with their sizes and ranges: 40 energies per elastic series over 0.1–50 eV, a sum over four C2v
 * irreps, eigenphase sums that start below zero, 211 BEB energies from the first binding energy to
 * 5000 eV with each orbital zero below its own, rates at 41 temperatures with their fits, and an orbital
 * table of one value per column per orbital. The curves are made-up shapes; only the ionization rates
 * follow their fit, k(T) = α (T/300 K)^β exp(−γ/T) with γ ≈ 1.5 × 10⁵ K, which at 1000 K is about
 * 10⁻⁷⁷ cm³ s⁻¹ — the range a real BEB rate spans.
 */
export function waterShapedResults(): RunResults {
  let shapedId = 0;
  const nextShapedId = () => `7e50c000-0000-4000-8000-${String(++shapedId).padStart(4, "0")}00000100`;
  const elasticEnergies = logSpaced(0.1, 50, 40);
  const irreps = ["A1", "A2", "B1", "B2"];
  const weights = [0.5, 0.01, 0.25, 0.25];
  const elasticParts = irreps.map((irrep, i) =>
    result({
      id: nextShapedId(),
      kind: "cross-section",
      process: "elastic",
      irrep,
      columns: {
        energy_eV: elasticEnergies,
        cross_section_A2: elasticEnergies.map((e) => (weights[i]! * 60) / (1 + e / 5)),
      },
      columnOrder: ["energy_eV", "cross_section_A2"],
      method: `${DEMO_METHOD} Irrep ${irrep} only.`,
    }),
  );
  const elasticWhole = result({
    id: nextShapedId(),
    kind: "cross-section",
    process: "elastic",
    columns: { energy_eV: elasticEnergies, cross_section_A2: elasticEnergies.map((e) => 60 / (1 + e / 5)) },
    columnOrder: ["energy_eV", "cross_section_A2"],
    method: `${DEMO_METHOD} Summed over 4 irreps.`,
  });
  const eigenphases = [null, ...irreps].map((irrep) =>
    result({
      id: nextShapedId(),
      kind: "eigenphase-sum",
      process: "elastic",
      irrep,
      columns: {
        energy_eV: elasticEnergies,
        eigenphase_sum_rad: elasticEnergies.map((e) => -0.3 + Math.log1p(e)),
      },
      columnOrder: ["energy_eV", "eigenphase_sum_rad"],
    }),
  );
  const bebEnergies = logSpaced(13.418, 5000, 211);
  const bindings: [string, string, number][] = [
    ["A1", "1a1", 559.2],
    ["A1", "2a1", 36.37],
    ["B2", "1b2", 19.02],
    ["A1", "3a1", 15.42],
    ["B1", "1b1", 13.418],
  ];
  const bebPart = (b: number) =>
    bebEnergies.map((e) => (e <= b ? 0 : ((1 - b / e) * Math.log(e / b)) / (e / 50)));
  const bebTotal = result({
    id: nextShapedId(),
    kind: "cross-section",
    process: "ionization",
    columns: {
      energy_eV: bebEnergies,
      cross_section_A2: bebEnergies.map((_, i) => bindings.reduce((sum, [, , b]) => sum + bebPart(b)[i]!, 0)),
    },
    columnOrder: ["energy_eV", "cross_section_A2"],
    method: `${BEB_MODEL}; sum over 5 occupied orbitals.`,
  });
  const bebParts = bindings.map(([irrep, label, b]) =>
    result({
      id: nextShapedId(),
      kind: "cross-section",
      process: "ionization",
      irrep,
      label,
      columns: { energy_eV: bebEnergies, cross_section_A2: bebPart(b) },
      columnOrder: ["energy_eV", "cross_section_A2"],
      method: `${BEB_MODEL}; orbital ${label}: B = ${b} eV, N = 2.`,
    }),
  );
  const temperatures = logSpaced(1000, 100_000, 41);
  const rate = (
    process: "elastic" | "momentum-transfer" | "ionization",
    alpha: number,
    beta: number,
    gamma: number,
  ) =>
    result({
      id: nextShapedId(),
      kind: "rate-coefficient",
      process,
      columns: {
        temperature_K: temperatures,
        rate_cm3_per_s: temperatures.map((t) => alpha * (t / 300) ** beta * Math.exp(-gamma / t)),
      },
      columnOrder: ["temperature_K", "rate_cm3_per_s"],
      fit: {
        alpha_cm3_per_s: alpha,
        beta,
        gamma_K: gamma,
        minTemperatureK: 1000,
        maxTemperatureK: 100_000,
        maxRelativeDeviation: 0.11,
      },
    });
  const orbitalRows = bindings.map(([irrep, label, b], i) =>
    orbital(`7e50c000-0000-4000-8000-0000000002${i}0`, irrep, label, [-b, b, 50 + i, 2]),
  );
  return {
    ...derivedResults(),
    results: [
      elasticWhole,
      ...elasticParts,
      bebTotal,
      ...bebParts,
      ...eigenphases,
      rate("elastic", 6.15e-7, -0.034, 2992),
      rate("momentum-transfer", 8.59e-7, -0.19, 2699),
      rate("ionization", 1.515e-10, 0.9506, 154_757),
      ...orbitalRows,
    ],
  };
}
