/**
 * The demo scattering code as a Sigmaflow code definition: deploy/demo-codes/radial-scatter, a
 * teaching-grade spherical model-potential solver (see its README). Its template writes the solver's
 * input JSON from the run's target and parameters; it writes kmatrices.txt, which Sigmaflow reads to
 * derive cross sections, eigenphase sums and rates.
 *
 * With `useStageDensity` (the default) the input names `density.txt`, the spherically averaged
 * Hartree–Fock electron density that the demo code hf-orbitals writes (deploy/demo/codes/psi4-orbitals.ts):
 * a recipe copies a stage's declared outputs into the next stage's folder, so radial-scatter then needs an
 * hf-orbitals stage before it (the recipe "orbitals-to-elastic"), and the static potential is that of the
 * Hartree–Fock density. Run on its own, set `useStageDensity` to false: the solver then builds the density
 * from Slater-rule atomic densities.
 */
import { fileURLToPath } from "node:url";
import type { CodeDefinitionInput } from "../../../shared/schemas/codes";

/** Absolute path of the program in this checkout (the development host runs it from here). */
export const RADIAL_SCATTER_PATH = fileURLToPath(
  new URL("../../demo-codes/radial-scatter/radial-scatter", import.meta.url),
);

/** 40 collision energies, log-spaced from 0.1 eV to 50 eV (4 significant figures). */
export const DEFAULT_ENERGIES_EV = Array.from({ length: 40 }, (_, i) =>
  Number((0.1 * 500 ** (i / 39)).toPrecision(4)),
);

const INPUT_TEMPLATE = `{
  "model": "molecule",
  "target": {{ target }},
  "lmax": {{ lmax }},
  "energiesEv": {{ energiesEv }},
  "polarizabilityBohr3": {{ polarizabilityBohr3 }},
  "cutoffRadiusBohr": {{ cutoffRadiusBohr }}{% if useStageDensity %},
  "densityFile": "density.txt"{% endif %}
}
`;

export function radialScatterDefinition(executable: string = RADIAL_SCATTER_PATH) {
  return {
    name: "radial-scatter",
    version: "1.0",
    description:
      "Sigmaflow's demo scattering code: an electron in a spherically averaged model potential of the target " +
      "(static term from the nuclei and the electron density, plus polarization with a short-range cut-off); " +
      "K-matrices per irreducible representation and energy. By default the density is the Hartree–Fock one " +
      "in density.txt from an hf-orbitals stage before it (recipe orbitals-to-elastic); run alone, turn " +
      "useStageDensity off for Slater-rule atomic densities. A teaching-grade model, not a production " +
      "scattering method: no exchange, no anisotropy; results for ions are qualitative only.",
    executable,
    arguments: ["scatter.json"],
    inputTemplates: [{ fileName: "scatter.json", format: "json", template: INPUT_TEMPLATE }],
    parameters: {
      type: "object",
      additionalProperties: false,
      required: ["polarizabilityBohr3"],
      properties: {
        lmax: {
          type: "integer",
          minimum: 0,
          maximum: 12,
          default: 6,
          description: "Highest partial wave l.",
        },
        energiesEv: {
          type: "array",
          items: { type: "number", exclusiveMinimum: 0, maximum: 1000 },
          minItems: 1,
          maxItems: 2000,
          default: DEFAULT_ENERGIES_EV,
          description: "Collision energies in eV, strictly increasing.",
        },
        polarizabilityBohr3: {
          type: "number",
          minimum: 0,
          maximum: 1000,
          description: "Mean dipole polarizability α of the target, bohr³ (1 Å³ = 6.748 bohr³).",
        },
        cutoffRadiusBohr: {
          type: "number",
          exclusiveMinimum: 0,
          maximum: 20,
          default: 2,
          description: "Cut-off radius r_c of the polarization term, bohr.",
        },
        useStageDensity: {
          type: "boolean",
          default: true,
          description:
            "Use density.txt, the Hartree–Fock density written by an hf-orbitals stage before this one; " +
            "off: Slater-rule atomic densities (for radial-scatter run on its own).",
        },
      },
    },
    outputFiles: ["kmatrices.txt"],
    outputRules: {
      progress: ["^progress (?<done>[0-9]+)/(?<total>[0-9]+) irreps$"],
      timings: ["^irrep (?<symmetry>\\S+) finished in (?<seconds>[0-9.]+) s$"],
    },
    resultFiles: [{ fileName: "kmatrices.txt", reader: "kmatrix-table" }],
    defaults: { cores: 1, wallTimeMinutes: 10 },
  } satisfies CodeDefinitionInput;
}

export const radialScatterCode = radialScatterDefinition();
