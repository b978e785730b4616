/**
 * Electronic and electrostatic properties of a target that follow from its geometry and charge:
 * electron count, spin multiplicity check, nuclear repulsion energy, dipole moment about the centre of mass.
 */
import { atomicUnitsToDebye, BOHR_RADIUS_ANGSTROM } from "../constants";
import { ScienceInputError } from "../errors";
import { centreOfMass } from "./inertia";
import { distance, sub, type Vec3 } from "./linear-algebra";
import type { TargetAtom } from "./target";

/**
 * Number of electrons N = Σ Zᵢ − Q.
 *
 * @param atoms - atoms with atomic numbers
 * @param chargeE - total charge Q in units of e (integer; −1 for an anion)
 * @returns electron count
 * @throws ScienceInputError when Q is not an integer or exceeds the nuclear charge
 */
export function electronCount(atoms: readonly Pick<TargetAtom, "atomicNumber">[], chargeE: number): number {
  if (!Number.isInteger(chargeE)) {
    throw new ScienceInputError(`The charge must be an integer number of e, got ${chargeE}.`, { chargeE });
  }
  const nuclear = atoms.reduce((acc, atom) => acc + atom.atomicNumber, 0);
  const count = nuclear - chargeE;
  if (count < 0) {
    throw new ScienceInputError(
      `A charge of ${chargeE} leaves ${count} electrons: the nuclei carry only +${nuclear}.`,
      { chargeE, nuclearCharge: nuclear },
    );
  }
  return count;
}

/**
 * Checks a spin multiplicity 2S+1 against the electron count, or picks the lowest allowed one.
 *
 * @param electrons - electron count N
 * @param multiplicity - requested 2S+1; omitted -> 1 for even N, 2 for odd N
 * @returns the multiplicity
 * @throws ScienceInputError when M is not a positive integer, when M − 1 (the number of unpaired electrons)
 *   and N differ in parity, or when M − 1 > N
 */
export function resolveMultiplicity(electrons: number, multiplicity?: number): number {
  if (multiplicity === undefined) return electrons % 2 === 0 ? 1 : 2;
  if (!Number.isInteger(multiplicity) || multiplicity < 1) {
    throw new ScienceInputError(`The multiplicity 2S+1 must be a positive integer, got ${multiplicity}.`, {
      multiplicity,
    });
  }
  const unpaired = multiplicity - 1;
  if (unpaired > electrons) {
    throw new ScienceInputError(
      `Multiplicity ${multiplicity} needs ${unpaired} unpaired electrons but the target has ${electrons}.`,
      { multiplicity, electrons },
    );
  }
  if (unpaired % 2 !== electrons % 2) {
    const allowed = electrons % 2 === 0 ? "odd (1, 3, 5...)" : "even (2, 4, 6...)";
    throw new ScienceInputError(
      `Multiplicity ${multiplicity} is impossible with ${electrons} electrons: ` +
        `${electrons % 2 === 0 ? "an even" : "an odd"} electron count needs an ${allowed} multiplicity.`,
      { multiplicity, electrons },
    );
  }
  return multiplicity;
}

/**
 * Nuclear repulsion energy E_nn = Σ_{i<j} Zᵢ Zⱼ / rᵢⱼ of point nuclei.
 *
 * @param atoms - atomic numbers and positions in Å
 * @returns E_nn in hartree (distances converted to bohr with the CODATA 2018 Bohr radius)
 */
export function nuclearRepulsionHartree(
  atoms: readonly Pick<TargetAtom, "atomicNumber" | "positionAngstrom">[],
): number {
  let energy = 0;
  for (let i = 0; i < atoms.length; i++) {
    for (let j = i + 1; j < atoms.length; j++) {
      const rBohr = distance(atoms[i]!.positionAngstrom, atoms[j]!.positionAngstrom) / BOHR_RADIUS_ANGSTROM;
      energy += (atoms[i]!.atomicNumber * atoms[j]!.atomicNumber) / rBohr;
    }
  }
  return energy;
}

export interface DipoleMoment {
  /** Dipole vector in e·a₀ (atomic units). */
  atomicUnits: Vec3;
  /** Dipole vector in debye. */
  debye: Vec3;
  /** |d| in debye. */
  magnitudeDebye: number;
  /** The point the dipole refers to, in Å. */
  originAngstrom: Vec3;
}

function dipoleResult(atomicUnits: Vec3, originAngstrom: Vec3): DipoleMoment {
  const debye = atomicUnits.map(atomicUnitsToDebye) as Vec3;
  return { atomicUnits, debye, magnitudeDebye: Math.hypot(...debye), originAngstrom };
}

/**
 * Moves a dipole moment to another origin. For a system of total charge Q the dipole depends on the
 * origin: d(O') = Σ qᵢ (rᵢ − O') = d(O) − Q·(O' − O). Neutral targets (Q = 0) have the same dipole about
 * every point; for ions the value about the centre of mass is the one rotational theory uses.
 *
 * @param dipoleAtomicUnits - d(O) in e·a₀
 * @param chargeE - total charge Q in e
 * @param fromOriginAngstrom - O in Å
 * @param toOriginAngstrom - O' in Å
 * @returns d(O') in e·a₀ and debye
 * Reference: Jackson, "Classical Electrodynamics", 3rd ed., §4.1 (multipole expansion; origin dependence of
 * the dipole of a charged distribution).
 */
export function shiftDipoleOrigin(
  dipoleAtomicUnits: Vec3,
  chargeE: number,
  fromOriginAngstrom: Vec3,
  toOriginAngstrom: Vec3,
): DipoleMoment {
  const shiftBohr = sub(toOriginAngstrom, fromOriginAngstrom).map((x) => x / BOHR_RADIUS_ANGSTROM) as Vec3;
  const moved: Vec3 = [
    dipoleAtomicUnits[0] - chargeE * shiftBohr[0],
    dipoleAtomicUnits[1] - chargeE * shiftBohr[1],
    dipoleAtomicUnits[2] - chargeE * shiftBohr[2],
  ];
  return dipoleResult(moved, [...toOriginAngstrom] as Vec3);
}

/**
 * Dipole moment of a target with the given partial charges, about its centre of mass:
 * d = Σ qᵢ (rᵢ − R_cm).
 *
 * @param atoms - isotope masses (for R_cm) and positions in Å
 * @param partialChargesE - one charge per atom in e; their sum is the total charge Q
 * @param expectedChargeE - when given, Σ qᵢ must equal it within 1e-6 e
 * @returns dipole about the centre of mass in e·a₀ and debye
 * @throws ScienceInputError when the number of charges differs from the number of atoms or their sum is
 *   not the expected charge
 */
export function dipoleFromPartialCharges(
  atoms: readonly Pick<TargetAtom, "massU" | "positionAngstrom">[],
  partialChargesE: readonly number[],
  expectedChargeE?: number,
): DipoleMoment & { totalChargeE: number } {
  if (partialChargesE.length !== atoms.length) {
    throw new ScienceInputError(
      `Got ${partialChargesE.length} partial charges for ${atoms.length} atoms: give one per atom.`,
      { charges: partialChargesE.length, atoms: atoms.length },
    );
  }
  const total = partialChargesE.reduce((acc, q) => acc + q, 0);
  if (expectedChargeE !== undefined && Math.abs(total - expectedChargeE) > 1e-6) {
    throw new ScienceInputError(
      `The partial charges add up to ${total.toFixed(6)} e, not the target charge ${expectedChargeE} e.`,
      { totalChargeE: total, expectedChargeE },
    );
  }
  const com = centreOfMass(atoms);
  const d: Vec3 = [0, 0, 0];
  atoms.forEach((atom, i) => {
    const r = sub(atom.positionAngstrom, com);
    for (let k = 0; k < 3; k++) d[k]! += (partialChargesE[i]! * r[k]!) / BOHR_RADIUS_ANGSTROM;
  });
  return { ...dipoleResult(d, com), totalChargeE: total };
}
