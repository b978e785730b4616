/**
 * Results from an orbital table: the table itself (one row per occupied orbital), BEB ionization cross
 * sections per orbital and in total, and the Maxwellian ionization rate coefficient with its fit.
 *
 * Inputs of the BEB model per occupied orbital (Kim and Rudd, Phys. Rev. A 50, 3954 (1994)):
 *   B = −ε, the orbital energy with its sign changed (Koopmans' theorem; common practice for BEB),
 *   U = ⟨φ|−½∇²|φ⟩, the orbital kinetic energy,
 *   N = the occupation in electrons.
 * A measured first ionization energy (`analysis.firstIonizationEnergyEv`) replaces B of the highest
 * occupied orbital only — with the orbitals degenerate with it (within 1e-5 hartree), which are components
 * of the same level in the Abelian subgroup; every other orbital keeps B = −ε.
 * A target of charge +1 uses the BEB variant for singly charged ions (shared/science/ionization/beb.ts);
 * BEB is not derived for other charges.
 */
import type { RunAnalysis } from "../../shared/schemas/results";
import { HARTREE_EV } from "../../shared/science/constants";
import { ScienceInputError } from "../../shared/science/errors";
import { logGrid } from "../../shared/science/grids";
import { bebCrossSections } from "../../shared/science/ionization";
import {
  type Derivation,
  type DerivedResult,
  quote,
  rateCoefficientResult,
  resultRow,
} from "./derive-common";

/** What the derivation reads of an orbital table (worker/results/readers/orbital-table.ts). */
export interface OrbitalTableInput {
  program: string;
  method: string;
  basis: string;
  orbitals: readonly {
    label: string;
    irrep: string;
    energyHartree: number;
    occupation: number;
    kineticHartree: number;
  }[];
}

/** Log-spaced points of the BEB energy grid (round energies and thresholds are added exactly). */
export const BEB_GRID_POINTS = 200;
/** Orbitals whose energies differ by less than this are one degenerate level. */
const DEGENERACY_TOLERANCE_HARTREE = 1e-5;
/** Occupations below this count as empty (numerical noise of fractional occupations). */
const OCCUPIED_ELECTRONS = 1e-8;
/** Longest label a result row stores (run_results.label). */
const MAX_LABEL = 64;

/**
 * Round energies 1, 2, 5 × 10^k eV from 1 eV to 100 keV: points a reader looks up in a table, present
 * exactly so that no check needs interpolation.
 */
export const ROUND_ENERGIES_EV = [0, 1, 2, 3, 4, 5].flatMap((decade) =>
  [1, 2, 5].map((f) => f * 10 ** decade),
);

/**
 * The BEB energy grid: log-spaced from the lowest threshold to `maxEv`, plus every orbital's threshold and
 * the round energies in between, exactly.
 *
 * @param thresholdsEv - binding energies B (eV, > 0)
 * @param maxEv - highest collision energy, eV
 * @returns increasing energies in eV
 * @throws ScienceInputError when maxEv is not above the lowest threshold
 */
export function bebEnergyGridEv(thresholdsEv: readonly number[], maxEv: number): number[] {
  const lowest = Math.min(...thresholdsEv);
  if (!(maxEv > lowest)) {
    throw new ScienceInputError(
      `the analysis's ionizationEnergyMaxEv (${maxEv} eV) is not above the lowest binding energy (${quote(lowest)} eV)`,
    );
  }
  const exact = [
    ...thresholdsEv.filter((b) => b < maxEv),
    ...ROUND_ENERGIES_EV.filter((e) => e > lowest && e < maxEv),
  ];
  // A log point within 1e-9 (relative) of an exact point would be a near-duplicate: the exact one stays.
  const near = (e: number) => exact.some((x) => Math.abs(e - x) <= 1e-9 * x);
  const points = [...exact, ...logGrid(lowest, maxEv, BEB_GRID_POINTS).filter((e) => !near(e))];
  return [...new Set(points)].sort((a, b) => a - b);
}

/**
 * Results from an orbital table.
 *
 * @param table - the orbitals (energies and kinetic energies in hartree, occupations in electrons)
 * @param analysis - the run's postprocess options
 * @param context.charge - the target's charge (null: unknown, the neutral formula is used and said so)
 * @param context.source - where the table came from, e.g. "orbitals.txt of stage scf"
 * @returns the orbital table rows, BEB per orbital and total, the ionization rate; notes on skipped parts
 * @throws ScienceInputError for orbitals that cannot enter BEB (an occupied orbital with ε ≥ 0…)
 */
export function deriveIonizationResults(
  table: OrbitalTableInput,
  analysis: RunAnalysis,
  context: { charge: number | null; source: string },
): Derivation {
  const occupied = table.orbitals.filter((orbital) => orbital.occupation > OCCUPIED_ELECTRONS);
  if (occupied.length === 0) throw new ScienceInputError(`${context.source} lists no occupied orbital`);
  const seen = new Set<string>();
  for (const orbital of occupied) {
    const key = `${orbital.irrep}\u0000${orbital.label}`;
    if (seen.has(key))
      throw new ScienceInputError(`orbital ${orbital.label} (${orbital.irrep}) is listed twice`);
    seen.add(key);
    if (orbital.label.length === 0 || orbital.label.length > MAX_LABEL) {
      throw new ScienceInputError(
        `orbital label "${orbital.label.slice(0, MAX_LABEL)}…" is empty or too long`,
      );
    }
    if (!(orbital.energyHartree < 0)) {
      throw new ScienceInputError(
        `orbital ${orbital.label} is occupied but its energy ${orbital.energyHartree} hartree is not negative, so ` +
          "−ε is no binding energy",
      );
    }
    if (!(orbital.kineticHartree >= 0)) {
      throw new ScienceInputError(
        `orbital ${orbital.label}: its kinetic energy ${orbital.kineticHartree} hartree is negative`,
      );
    }
  }
  const highestHartree = Math.max(...occupied.map((orbital) => orbital.energyHartree));
  const override = analysis.firstIonizationEnergyEv;
  const replaced = occupied.filter(
    (orbital) =>
      override !== undefined && highestHartree - orbital.energyHartree <= DEGENERACY_TOLERANCE_HARTREE,
  );
  const inputs = occupied.map((orbital) => ({
    orbital,
    bindingEv: replaced.includes(orbital) ? override! : -orbital.energyHartree * HARTREE_EV,
    kineticEv: orbital.kineticHartree * HARTREE_EV,
  }));

  const origin = `${table.program} ${table.method}/${table.basis} orbitals from ${context.source}`;
  const results: DerivedResult[] = [];
  const notes: string[] = [];
  const overrideNote =
    replaced.length > 0
      ? `; B of ${replaced.map((o) => o.label).join(", ")} replaced by the measured first ionization energy ${override} eV (the highest occupied level only)`
      : "";
  for (const input of inputs) {
    results.push(
      resultRow(
        {
          kind: "orbital-table",
          process: "orbitals",
          irrep: input.orbital.irrep,
          label: input.orbital.label,
          method: `${origin}: orbital energy ε, binding energy B = −ε (Koopmans' theorem, common practice)${overrideNote}, orbital kinetic energy U and occupation N as used by the BEB model.`,
        },
        [
          ["orbital_energy_eV", [input.orbital.energyHartree * HARTREE_EV]],
          ["binding_energy_eV", [input.bindingEv]],
          ["kinetic_energy_eV", [input.kineticEv]],
          ["occupation_electrons", [input.orbital.occupation]],
        ],
      ),
    );
  }

  if (context.charge !== null && context.charge !== 0 && context.charge !== 1) {
    notes.push(
      `No BEB ionization cross section: the model covers neutral targets and singly charged positive ions, and this target's charge is ${context.charge}.`,
    );
    return { results, notes };
  }
  const variant = context.charge === 1 ? "singly-charged-ion" : "neutral";
  const energiesEv = bebEnergyGridEv(
    inputs.map((input) => input.bindingEv),
    analysis.ionizationEnergyMaxEv,
  );
  const beb = bebCrossSections({
    orbitals: inputs.map((input) => ({
      label: input.orbital.label,
      bindingEv: input.bindingEv,
      kineticEv: input.kineticEv,
      occupation: input.orbital.occupation,
    })),
    energiesEv,
    variant,
  });
  const model =
    `Binary-Encounter-Bethe model (Y.-K. Kim and M. E. Rudd, Phys. Rev. A 50, 3954 (1994))` +
    (variant === "singly-charged-ion"
      ? ", variant for singly charged ions (denominator t + (u + 1)/2; provisional, see the science core)"
      : context.charge === null
        ? ", neutral formula (the run names no target, so its charge is taken as 0)"
        : ", neutral formula") +
    `, from ${origin}; B = −ε (Koopmans' theorem, common practice)${overrideNote}; U = orbital kinetic energy; ` +
    "N = occupation";
  results.push(
    resultRow(
      {
        kind: "cross-section",
        process: "ionization",
        irrep: null,
        label: "",
        method: `${model}; sum over ${inputs.length} occupied orbitals.`,
      },
      [
        ["energy_eV", beb.energiesEv],
        ["cross_section_A2", beb.totalA2],
      ],
    ),
  );
  inputs.forEach((input, i) => {
    results.push(
      resultRow(
        {
          kind: "cross-section",
          process: "ionization",
          irrep: input.orbital.irrep,
          label: input.orbital.label,
          method: `${model}; orbital ${input.orbital.label}: B = ${quote(input.bindingEv, 6)} eV, U = ${quote(input.kineticEv, 6)} eV, N = ${input.orbital.occupation}.`,
        },
        [
          ["energy_eV", beb.energiesEv],
          ["cross_section_A2", beb.orbitalA2[i]!],
        ],
      ),
    );
  });
  const rate = rateCoefficientResult(
    { process: "ionization", irrep: null, label: "", source: "the BEB total above" },
    { energiesEv: beb.energiesEv, crossSectionsA2: beb.totalA2 },
    analysis,
    true,
  );
  return { results: [...results, ...rate.results], notes: [...notes, ...rate.notes] };
}
