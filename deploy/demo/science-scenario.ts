/**
 * The demo scenario's recipes and the runs the seed queues for the Kestrel group. Everything here is a
 * demo of our own; the numbers the runs produce are computed by psi4 and the demo solver, never written
 * down here.
 */
import type { RunAnalysis } from "../../shared/schemas/results";

export type DemoRecipe = {
  name: string;
  description: string;
  stages: { name: string; code: string }[];
};

export const DEMO_RECIPES: readonly DemoRecipe[] = [
  {
    name: "orbitals-to-ionization",
    description:
      "Orbitals → ionization: Hartree–Fock orbitals of the target (psi4), then Sigmaflow derives BEB total " +
      "ionization cross sections per orbital, Maxwellian rate coefficients and their Arrhenius fit.",
    stages: [{ name: "orbitals", code: "hf-orbitals" }],
  },
  {
    name: "orbitals-to-elastic",
    description:
      "Orbitals → elastic: Hartree–Fock orbitals and the target's static potential (psi4), then the demo " +
      "solver's K-matrices per irreducible representation (teaching-grade model potential); Sigmaflow " +
      "derives elastic and momentum-transfer cross sections, eigenphase sums and rate coefficients.",
    stages: [
      { name: "orbitals", code: "hf-orbitals" },
      { name: "scatter", code: "radial-scatter" },
    ],
  },
];

/**
 * Dipole polarizabilities for the demo solver's polarization term, in bohr³ (1 Å³ = 6.748 bohr³). Values
 * from memory of the CRC Handbook of Chemistry and Physics table "Atomic and molecular polarizabilities":
 * H2O 1.45 Å³, CH4 2.59 Å³ — rounded; good enough for a teaching-grade demo, not for data work.
 */
const POLARIZABILITY_BOHR3 = { water: 9.8, methane: 17.5 } as const;

export type DemoRun = {
  name: string;
  recipe: string;
  target: string;
  parameters: Record<string, Record<string, unknown>>;
  analysis?: Partial<RunAnalysis>;
};

/** Runs the seed queues (each once, by name). "Monodeuteromethane — elastic" is left for you to submit. */
export const DEMO_RUNS: readonly DemoRun[] = [
  {
    name: "Water — ionization, aug-cc-pVDZ",
    recipe: "orbitals-to-ionization",
    target: "Water",
    parameters: { orbitals: { basis: "aug-cc-pvdz" } },
  },
  {
    name: "Nitrogen trifluoride — ionization, cc-pVDZ",
    recipe: "orbitals-to-ionization",
    target: "Nitrogen trifluoride",
    parameters: { orbitals: { basis: "cc-pvdz" } },
  },
  {
    name: "Formyl cation — ionization, cc-pVDZ",
    recipe: "orbitals-to-ionization",
    target: "Formyl cation",
    parameters: { orbitals: { basis: "cc-pvdz" } },
  },
  {
    name: "Water — elastic, cc-pVDZ",
    recipe: "orbitals-to-elastic",
    target: "Water",
    parameters: {
      orbitals: { basis: "cc-pvdz" },
      scatter: { polarizabilityBohr3: POLARIZABILITY_BOHR3.water, lmax: 6 },
    },
  },
  {
    name: "Methane — elastic, cc-pVDZ",
    recipe: "orbitals-to-elastic",
    target: "Methane",
    parameters: {
      orbitals: { basis: "cc-pvdz" },
      scatter: { polarizabilityBohr3: POLARIZABILITY_BOHR3.methane, lmax: 6 },
    },
  },
];
