/**
 * What the target editor shows while one types: the science core's inspection of the atoms (the same
 * `inspectTarget` the server stores with each version), a plain check of charge and multiplicity, the
 * basis-set coverage and the enclosed-charge curve. Pure: no React, so the benchmark times exactly this.
 */
import type { TargetAtom } from "@shared/schemas";
import { type BasisCoverageReport, basisCoverage } from "@shared/science/basis-coverage";
import { ScienceInputError } from "@shared/science/errors";
import { inspectTarget, resolveMultiplicity, type TargetInspection } from "@shared/science/geometry";
import { type EnclosedChargeCurve, enclosedChargeCurve } from "./enclosed-charge";

export interface DeriveOptions {
  charge: number;
  /** Undefined: the lowest the electron count allows. */
  multiplicity: number | undefined;
  basis: string;
  /** Most diffuse exponent α of the chosen basis, bohr⁻². */
  diffuseExponentBohr2: number;
}

export interface DerivedTarget {
  inspection: TargetInspection | null;
  /** Why there is no inspection (a science-core message), or null. */
  problem: string | null;
  /** Plain words on the electron count and the multiplicity, and whether they fit together. */
  spin: { ok: boolean; message: string } | null;
  coverage: BasisCoverageReport | null;
  chargeCurve: EnclosedChargeCurve | null;
}

const SPIN_NAMES = ["singlet", "doublet", "triplet", "quartet", "quintet", "sextet", "septet", "octet"];
const spinName = (multiplicity: number) => SPIN_NAMES[multiplicity - 1] ?? `multiplicity ${multiplicity}`;

function spinCheck(electrons: number, multiplicity: number | undefined) {
  const parity = electrons % 2 === 0 ? "even" : "odd";
  try {
    const resolved = resolveMultiplicity(electrons, multiplicity);
    const lowest = multiplicity === undefined ? " (the lowest possible)" : "";
    return {
      ok: true,
      message: `${electrons} electrons (${parity}): multiplicity ${resolved}, a ${spinName(resolved)}${lowest}, fits.`,
    };
  } catch (error) {
    if (!(error instanceof ScienceInputError)) throw error;
    return { ok: false, message: error.message };
  }
}

/** Derives everything the panel shows from checked atoms; problems become messages, never exceptions. */
export function deriveTarget(atoms: readonly TargetAtom[], options: DeriveOptions): DerivedTarget {
  const empty: DerivedTarget = {
    inspection: null,
    problem: null,
    spin: null,
    coverage: null,
    chargeCurve: null,
  };
  if (atoms.length === 0) return { ...empty, problem: "Add atoms to see what Sigmaflow derives from them." };
  let inspection: TargetInspection;
  try {
    // Multiplicity left out here: a wrong one should not hide the rest of the panel.
    inspection = inspectTarget({
      atoms: atoms.map((atom) => ({
        symbol: atom.symbol,
        massNumber: atom.massNumber,
        positionAngstrom: [atom.xAngstrom, atom.yAngstrom, atom.zAngstrom],
      })),
      chargeE: options.charge,
    });
  } catch (error) {
    if (!(error instanceof ScienceInputError)) throw error;
    return { ...empty, problem: error.message };
  }
  let coverage: BasisCoverageReport | null = null;
  try {
    coverage = basisCoverage(
      options.basis,
      atoms.map((atom) => atom.symbol),
    );
  } catch (error) {
    if (!(error instanceof ScienceInputError)) throw error;
  }
  return {
    inspection,
    problem: null,
    spin: spinCheck(inspection.electronCount, options.multiplicity),
    coverage,
    chargeCurve:
      options.diffuseExponentBohr2 > 0 ? enclosedChargeCurve(inspection, options.diffuseExponentBohr2) : null,
  };
}
