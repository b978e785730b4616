/**
 * One-call summary of a target for the CLI, the API and the UI: isotopes, centre of mass, rotational
 * constants, rotor type, electron count, nuclear repulsion, point group, Abelian subgroup with irreps and
 * the standard orientation.
 */
import { inspectTargetRequestSchema, parseTargetInput } from "../../schemas/science-target";
import { getElement } from "../elements/isotopes";
import { analyzeSymmetry, type SymmetryAnalysis } from "../symmetry/point-group";
import {
  centreOfMass,
  classifyRotor,
  principalAxes,
  type RotorType,
  rayAsymmetry,
  rotationalConstants,
  totalMassU,
} from "./inertia";
import { type Mat3, matVec, type Vec3 } from "./linear-algebra";
import {
  type DipoleMoment,
  dipoleFromPartialCharges,
  electronCount,
  nuclearRepulsionHartree,
  resolveMultiplicity,
} from "./properties";
import { type AtomInput, buildTarget, type TargetAtom } from "./target";

export interface InspectTargetInput {
  atoms: readonly AtomInput[];
  /** Isotope mass numbers by 1-based atom index (wins over inline `H@2`). */
  isotopeOverrides?: Readonly<Record<number, number>>;
  /** Total charge in e (default 0). */
  chargeE?: number;
  /** Spin multiplicity 2S+1 (default: lowest allowed). */
  multiplicity?: number;
  /** Symmetry tolerance in Å (default 0.01). */
  toleranceAngstrom?: number;
  /** Partial charges in e, one per atom; gives the dipole about the centre of mass. */
  partialChargesE?: readonly number[];
}

export interface InspectedAtom {
  index: number;
  symbol: string;
  atomicNumber: number;
  massNumber: number;
  massU: number;
  /** Position in the standard orientation (centre of mass at the origin), Å. */
  positionAngstrom: Vec3;
}

export interface TargetInspection {
  atomCount: number;
  formula: string;
  totalMassU: number;
  chargeE: number;
  electronCount: number;
  multiplicity: number;
  /** Centre of mass in the input frame, Å. */
  centreOfMassAngstrom: Vec3;
  /** I_A ≤ I_B ≤ I_C, u·Å². */
  principalMomentsUAngstrom2: [number, number, number];
  /** A ≥ B ≥ C, cm⁻¹ (null where a moment vanishes). */
  rotationalConstantsCm1: [number | null, number | null, number | null];
  rotationalConstantsMHz: [number | null, number | null, number | null];
  rotorType: RotorType;
  rayAsymmetry: number | null;
  nuclearRepulsionHartree: number;
  pointGroup: string;
  groupOrder: number | null;
  abelianSubgroup: string;
  irreps: string[];
  characterTable: SymmetryAnalysis["abelianSubgroup"]["characterTable"];
  abelianOperations: string[];
  equivalentAtomSets: number[][];
  abelianEquivalentAtomSets: number[][];
  operations: SymmetryAnalysis["operations"];
  /** Rows: standard x, y, z axes in the input frame. */
  orientationMatrix: Mat3;
  toleranceAngstrom: number;
  maxSymmetrizationShiftAngstrom: number;
  atoms: InspectedAtom[];
  /** Dipole about the centre of mass in the standard orientation, when partial charges were given. */
  dipole: DipoleMoment | null;
}

/**
 * Hill-order formula (C, H, then alphabetical; without carbon all alphabetical). An atom whose isotope is
 * not its element's most abundant natural one is written with its mass number in brackets after the
 * common isotope of the same element: CH3[2H] (CH3D), [2H]2O (D2O), [13C]H4 (common practice of
 * isotopologue notation, e.g. IUPAC Green Book §2.10.1 — from memory).
 */
export function hillFormula(atoms: readonly Pick<TargetAtom, "symbol" | "massNumber">[]): string {
  const counts = new Map<string, Map<number, number>>();
  for (const atom of atoms) {
    const byMass = counts.get(atom.symbol) ?? new Map<number, number>();
    byMass.set(atom.massNumber, (byMass.get(atom.massNumber) ?? 0) + 1);
    counts.set(atom.symbol, byMass);
  }
  const hasCarbon = counts.has("C");
  const rank = (symbol: string) => (hasCarbon ? (symbol === "C" ? 0 : symbol === "H" ? 1 : 2) : 2);
  const symbols = [...counts.keys()].sort((p, q) => rank(p) - rank(q) || p.localeCompare(q));
  const parts: string[] = [];
  for (const symbol of symbols) {
    const common = getElement(symbol).defaultIsotope?.massNumber ?? null;
    // The common isotope first, then the others by mass number.
    const byMass = [...counts.get(symbol)!.entries()].sort(
      (p, q) => Number(q[0] === common) - Number(p[0] === common) || p[0] - q[0],
    );
    for (const [mass, n] of byMass) {
      const label = mass === common ? symbol : `[${mass}${symbol}]`;
      parts.push(n === 1 ? label : `${label}${n}`);
    }
  }
  return parts.join("");
}

/**
 * Rotor type informed by symmetry: exact degeneracies come from the point group (cubic and icosahedral
 * groups: spherical; an axis Cₙ or Sₙ with n ≥ 3: symmetric top), accidental ones from the moments.
 */
function rotorTypeWithSymmetry(
  symmetry: SymmetryAnalysis,
  masses: readonly number[],
  moments: [number, number, number],
): RotorType {
  if (symmetry.isAtom) return "atom";
  if (symmetry.isLinear) return "linear";
  const fromMoments = classifyRotor(moments);
  if (fromMoments === "spherical" || ["T", "Td", "Th", "O", "Oh", "I", "Ih"].includes(symmetry.pointGroup)) {
    return "spherical";
  }
  const axisOp = symmetry.operations.find(
    (op) => (op.kind === "C" || op.kind === "S") && op.n >= 3 && op.axis,
  );
  if (!axisOp) return fromMoments;
  const axis = axisOp.axis!;
  const momentAboutAxis = symmetry.standardPositionsAngstrom.reduce((acc, p, i) => {
    const along = p[0] * axis[0] + p[1] * axis[1] + p[2] * axis[2];
    return acc + masses[i]! * (p[0] * p[0] + p[1] * p[1] + p[2] * p[2] - along * along);
  }, 0);
  // The axis carries the unique moment: the smallest (prolate, I_A < I_B = I_C) or the largest (oblate).
  return Math.abs(momentAboutAxis - moments[0]) <= Math.abs(momentAboutAxis - moments[2])
    ? "prolate"
    : "oblate";
}

/**
 * Inspects a target (see {@link TargetInspection} for the fields).
 *
 * @param input - atoms (Å), isotope overrides, charge (e), multiplicity, tolerance (Å), partial charges (e)
 * @returns the summary; rotational constants and nuclear repulsion refer to the input geometry, the atom
 *   list to the standard orientation symmetrized under the Abelian subgroup
 * @throws ScienceInputError for unknown elements/isotopes, impossible charge or multiplicity, bad tolerance
 */
export function inspectTarget(raw: InspectTargetInput): TargetInspection {
  const input = parseTargetInput(inspectTargetRequestSchema, raw, "target");
  const atoms = buildTarget(input.atoms, {
    isotopeOverrides: input.isotopeOverrides as Record<number, number> | undefined,
  });
  const chargeE = input.chargeE ?? 0;
  const electrons = electronCount(atoms, chargeE);
  const multiplicity = resolveMultiplicity(electrons, input.multiplicity);
  const symmetry = analyzeSymmetry(atoms, input.toleranceAngstrom);
  const { momentsUAngstrom2 } = principalAxes(atoms);
  const constants = rotationalConstants(momentsUAngstrom2);
  const com = centreOfMass(atoms);
  let dipole: DipoleMoment | null = null;
  if (input.partialChargesE) {
    const d = dipoleFromPartialCharges(atoms, input.partialChargesE, chargeE);
    const rotate = (v: Vec3) => matVec(symmetry.rotation, v);
    dipole = {
      atomicUnits: rotate(d.atomicUnits),
      debye: rotate(d.debye),
      magnitudeDebye: d.magnitudeDebye,
      originAngstrom: [0, 0, 0],
    };
  }
  return {
    atomCount: atoms.length,
    formula: hillFormula(atoms),
    totalMassU: totalMassU(atoms),
    chargeE,
    electronCount: electrons,
    multiplicity,
    centreOfMassAngstrom: com,
    principalMomentsUAngstrom2: momentsUAngstrom2,
    rotationalConstantsCm1: constants.cm1,
    rotationalConstantsMHz: constants.mhz,
    rotorType: rotorTypeWithSymmetry(
      symmetry,
      atoms.map((a) => a.massU),
      momentsUAngstrom2,
    ),
    rayAsymmetry: rayAsymmetry(constants.cm1),
    nuclearRepulsionHartree: nuclearRepulsionHartree(atoms),
    pointGroup: symmetry.pointGroup,
    groupOrder: symmetry.order,
    abelianSubgroup: symmetry.abelianSubgroup.symbol,
    irreps: symmetry.abelianSubgroup.irreps,
    characterTable: symmetry.abelianSubgroup.characterTable,
    abelianOperations: symmetry.abelianSubgroup.operations.map((op) => op.label),
    equivalentAtomSets: symmetry.equivalentAtomSets,
    abelianEquivalentAtomSets: symmetry.abelianEquivalentAtomSets,
    operations: symmetry.operations,
    orientationMatrix: symmetry.rotation,
    toleranceAngstrom: symmetry.toleranceAngstrom,
    maxSymmetrizationShiftAngstrom: symmetry.maxSymmetrizationShiftAngstrom,
    atoms: atoms.map((atom, i) => ({
      index: atom.index,
      symbol: atom.symbol,
      atomicNumber: atom.atomicNumber,
      massNumber: atom.massNumber,
      massU: atom.massU,
      positionAngstrom: symmetry.standardPositionsAngstrom[i]!,
    })),
    dipole,
  };
}
