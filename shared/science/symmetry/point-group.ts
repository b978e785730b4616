/**
 * Point-group analysis of a target: full point group with all its operations, the largest D2h subgroup
 * used for calculations, the standard orientation, irreps and symmetry-equivalent atoms.
 *
 * Tolerance: an operation is accepted when it maps every atom within `toleranceAngstrom` (default
 * {@link DEFAULT_SYMMETRY_TOLERANCE_ANGSTROM}) of an atom of the same element and isotope; operations
 * obtained by composing accepted ones are kept when they map every atom within twice that distance.
 * Atoms of different isotopes are never equivalent (CH3D is C3v, not Td).
 */
import { ScienceInputError } from "../errors";
import { centreOfMass, principalAxes } from "../geometry/inertia";
import {
  cross,
  dot,
  type Mat3,
  matMul,
  matVec,
  norm,
  sub,
  transpose,
  type Vec3,
} from "../geometry/linear-algebra";
import { isotopeLabel, type TargetAtom } from "../geometry/target";
import { chooseAbelianSubgroup } from "./abelian-subgroup";
import { ABELIAN_TABLES, type AbelianGroupSymbol } from "./abelian-tables";
import { classifyPointGroup, describeOperation, type OperationKind } from "./classify";
import { findSymmetryOperations, type SymmetryOperationRaw } from "./operations";
import { canonicalFrame } from "./standard-orientation";

/** Default distance tolerance, Å: well above the rounding of coordinates printed with 4–5 decimals and
 * of optimised geometries (~1e-4 Å), well below any bond length. */
export const DEFAULT_SYMMETRY_TOLERANCE_ANGSTROM = 0.01;

export interface SymmetryOperation {
  label: string;
  kind: OperationKind;
  n: number;
  k: number;
  /** Axis or mirror normal in the standard orientation (null for E and i). */
  axis: Vec3 | null;
  /** Matrix acting on standard-orientation coordinates. */
  matrix: Mat3;
  /** 1-based: atom i moves onto atom permutation[i − 1]. */
  permutation: number[];
  /** Largest distance between a moved atom and its image in the input geometry, Å. */
  maxDeviationAngstrom: number;
}

export interface AbelianSubgroup {
  symbol: AbelianGroupSymbol;
  order: number;
  /** Operations in table order, with their atom permutations (1-based). */
  operations: { label: string; signs: [number, number, number]; permutation: number[] }[];
  /** Irreps in Cotton order. */
  irreps: string[];
  characterTable: { irrep: string; characters: number[] }[];
}

export interface SymmetryAnalysis {
  /** Schoenflies symbol: C1, Cs, Ci, Cn, Cnv, Cnh, Dn, Dnh, Dnd, S2n, T, Td, Th, O, Oh, I, Ih, C∞v, D∞h,
   * or Kh for a single atom. */
  pointGroup: string;
  /** Group order; null for the infinite groups (linear molecules and atoms). */
  order: number | null;
  isLinear: boolean;
  isAtom: boolean;
  toleranceAngstrom: number;
  /** All operations for finite groups; for C∞v, D∞h and Kh the operations of the Abelian subgroup. */
  operations: SymmetryOperation[];
  abelianSubgroup: AbelianSubgroup;
  /** Orbits of the full group, 1-based atom indices. */
  equivalentAtomSets: number[][];
  /** Orbits of the Abelian subgroup, 1-based. */
  abelianEquivalentAtomSets: number[][];
  /** Rows: standard x, y, z axes in the input frame; standard = rotation · (input − centre of mass). */
  rotation: Mat3;
  centreOfMassAngstrom: Vec3;
  /** Positions in the standard orientation (input atom order), symmetrized under the Abelian subgroup. */
  standardPositionsAngstrom: Vec3[];
  /** Largest move made by that symmetrization, Å. */
  maxSymmetrizationShiftAngstrom: number;
}

function orbits(n: number, permutations: number[][]): number[][] {
  const parent = Array.from({ length: n }, (_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) {
      parent[i] = parent[parent[i]!]!;
      i = parent[i]!;
    }
    return i;
  };
  for (const perm of permutations) {
    perm.forEach((j, i) => {
      const a = find(i);
      const b = find(j);
      if (a !== b) parent[Math.max(a, b)] = Math.min(a, b);
    });
  }
  const sets = new Map<number, number[]>();
  for (let i = 0; i < n; i++) {
    const root = find(i);
    const set = sets.get(root);
    if (set) set.push(i + 1);
    else sets.set(root, [i + 1]);
  }
  return [...sets.values()];
}

function matchPermutation(
  positions: readonly Vec3[],
  kinds: readonly string[],
  signs: [number, number, number],
  tol: number,
): number[] | null {
  const permutation: number[] = [];
  for (let i = 0; i < positions.length; i++) {
    const p = positions[i]!;
    const image: Vec3 = [signs[0] * p[0], signs[1] * p[1], signs[2] * p[2]];
    const j = positions.findIndex((q, jj) => kinds[jj] === kinds[i] && norm(sub(q, image)) <= tol);
    if (j < 0) return null;
    permutation.push(j);
  }
  return permutation;
}

function symmetrize(
  positions: readonly Vec3[],
  ops: { signs: [number, number, number]; permutation: number[] }[],
): { positions: Vec3[]; maxShift: number } {
  // x_j ← (1/|H|) Σ_h D_h x_{π_h(j)}: every h is an involution, so π_h⁻¹ = π_h.
  const out = positions.map((_, j) => {
    const acc: Vec3 = [0, 0, 0];
    for (const op of ops) {
      const q = positions[op.permutation[j]!]!;
      for (let c = 0; c < 3; c++) acc[c]! += op.signs[c]! * q[c]!;
    }
    return acc.map((v) => v / ops.length) as Vec3;
  });
  const maxShift = Math.max(0, ...out.map((p, i) => norm(sub(p, positions[i]!))));
  return { positions: out, maxShift };
}

function abelianFromSpecs(
  symbol: AbelianGroupSymbol,
  permutations: number[][],
): Omit<AbelianSubgroup, "operations"> & { operations: AbelianSubgroup["operations"] } {
  const table = ABELIAN_TABLES[symbol];
  return {
    symbol,
    order: table.operations.length,
    operations: table.operations.map((spec, i) => ({
      label: spec.label,
      signs: spec.signs,
      permutation: permutations[i]!.map((j) => j + 1),
    })),
    irreps: table.irreps.map((irrep) => irrep.name),
    characterTable: table.irreps.map((irrep) => ({ irrep: irrep.name, characters: irrep.characters })),
  };
}

function diagonalOperation(
  label: string,
  signs: [number, number, number],
  permutation: number[],
): SymmetryOperation {
  const kind: OperationKind =
    label === "E" ? "E" : label === "i" ? "i" : label.startsWith("σ") ? "sigma" : "C";
  const axisIndex = signs.filter((s) => s < 0).length === 1 ? signs.indexOf(-1) : signs.indexOf(1);
  const axis: Vec3 | null = kind === "E" || kind === "i" ? null : [0, 0, 0];
  if (axis) axis[axisIndex] = 1;
  return {
    label,
    kind,
    n: kind === "C" ? 2 : kind === "i" ? 2 : 1,
    k: kind === "E" ? 0 : 1,
    axis,
    matrix: [
      [signs[0], 0, 0],
      [0, signs[1], 0],
      [0, 0, signs[2]],
    ],
    permutation: permutation.map((j) => j + 1),
    maxDeviationAngstrom: 0,
  };
}

/** Linear molecules (C∞v, D∞h) and atoms (Kh): the operations are those of C2v or D2h along z. */
function analyzeInfinite(
  positions: Vec3[],
  kinds: string[],
  masses: number[],
  com: Vec3,
  tol: number,
  axis: Vec3 | null,
): SymmetryAnalysis {
  const n = positions.length;
  const isAtom = axis === null;
  const inversion = isAtom || matchPermutation(positions, kinds, [-1, -1, -1], tol) !== null;
  const symbol: AbelianGroupSymbol = inversion ? "D2h" : "C2v";
  let rotation: Mat3 = [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
  if (axis) {
    const lab: Vec3[] = [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ];
    const xGuess = lab.reduce((best, e) => (Math.abs(dot(e, axis)) < Math.abs(dot(best, axis)) ? e : best));
    rotation = canonicalFrame(
      { positionsAngstrom: positions, massesU: masses, toleranceAngstrom: tol, principalAxis: axis },
      [[axis, xGuess]],
    );
  }
  // On the axis x = y = 0 exactly; D∞h also makes z antisymmetric under inversion below.
  const oriented = positions.map((p) => [0, 0, dot(rotation[2], p)] as Vec3);
  const table = ABELIAN_TABLES[symbol];
  const permutations = table.operations.map(
    (spec) => matchPermutation(oriented, kinds, spec.signs, 2 * tol) ?? oriented.map((_, i) => i),
  );
  const ops = table.operations.map((spec, i) => ({ signs: spec.signs, permutation: permutations[i]! }));
  const { positions: standard } = symmetrize(oriented, ops);
  const rotated = positions.map((p) => matVec(rotation, p));
  const maxShift = Math.max(0, ...standard.map((p, i) => norm(sub(p, rotated[i]!))));
  const orbitSets = orbits(n, permutations);
  return {
    pointGroup: isAtom ? "Kh" : inversion ? "D∞h" : "C∞v",
    order: null,
    isLinear: !isAtom,
    isAtom,
    toleranceAngstrom: tol,
    operations: table.operations.map((spec, i) =>
      diagonalOperation(spec.label, spec.signs, permutations[i]!),
    ),
    abelianSubgroup: abelianFromSpecs(symbol, permutations),
    equivalentAtomSets: orbitSets,
    abelianEquivalentAtomSets: orbitSets,
    rotation,
    centreOfMassAngstrom: com,
    standardPositionsAngstrom: standard,
    maxSymmetrizationShiftAngstrom: maxShift,
  };
}

/**
 * Point group, operations, Abelian subgroup, standard orientation and equivalent atoms of a target.
 *
 * @param atoms - target atoms (positions in Å, isotopes resolved)
 * @param toleranceAngstrom - distance tolerance (default 0.01 Å), between 1e-6 and 0.3 Å
 * @returns the analysis (see {@link SymmetryAnalysis})
 * @throws ScienceInputError for a tolerance outside that range
 *
 * Method: centre of mass; an atom gives Kh; atoms on one line give C∞v or D∞h (inversion test); otherwise
 * {@link findSymmetryOperations} (candidate operations from symmetry-equivalence classes), then
 * {@link classifyPointGroup} and {@link chooseAbelianSubgroup}.
 */
export function analyzeSymmetry(
  atoms: readonly TargetAtom[],
  toleranceAngstrom = DEFAULT_SYMMETRY_TOLERANCE_ANGSTROM,
): SymmetryAnalysis {
  if (!(toleranceAngstrom >= 1e-6 && toleranceAngstrom <= 0.3)) {
    throw new ScienceInputError(
      `The symmetry tolerance must lie between 1e-6 and 0.3 Å, got ${toleranceAngstrom}.`,
      { toleranceAngstrom },
    );
  }
  const tol = toleranceAngstrom;
  const com = centreOfMass(atoms);
  const positions = atoms.map((atom) => sub(atom.positionAngstrom, com));
  const kinds = atoms.map(isotopeLabel);
  const masses = atoms.map((atom) => atom.massU);
  const radii = positions.map(norm);
  const far = radii.indexOf(Math.max(...radii));
  if (atoms.length === 1) return analyzeInfinite(positions, kinds, masses, com, tol, null);
  const lineAxis = positions[far]!.map((c) => c / radii[far]!) as Vec3;
  if (positions.every((p) => norm(cross(p, lineAxis)) <= tol)) {
    return analyzeInfinite(positions, kinds, masses, com, tol, lineAxis);
  }

  const search = findSymmetryOperations({ positionsAngstrom: positions, kinds, toleranceAngstrom: tol });
  const raw = search.operations;
  const labels = raw.map(describeOperation);
  const name = classifyPointGroup(raw, labels);
  const inertia = principalAxes(atoms).axes;
  const choice = chooseAbelianSubgroup(
    raw,
    labels,
    search.referenceAtoms,
    {
      positionsAngstrom: positions,
      massesU: masses,
      toleranceAngstrom: tol,
      principalAxis: name.principalAxis,
    },
    inertia,
  );
  const rotation = choice.frame;
  const toStandard = (m: Mat3) => matMul(matMul(rotation, m), transpose(rotation));
  const rotated = positions.map((p) => matVec(rotation, p));

  const table = ABELIAN_TABLES[choice.symbol];
  const memberBySigns = new Map<string, SymmetryOperationRaw>();
  for (const m of choice.members) {
    const op = raw[m]!;
    const inFrame = toStandard(op.matrix);
    memberBySigns.set([0, 1, 2].map((c) => (inFrame[c]![c]! > 0 ? 1 : -1)).join(","), op);
  }
  const abelianPermutations = table.operations.map((spec) => {
    const op = memberBySigns.get(spec.signs.join(","));
    if (!op) throw new Error(`internal: operation ${spec.label} of ${choice.symbol} not found in the frame`);
    return op.permutation;
  });
  const { positions: standard, maxShift } = symmetrize(
    rotated,
    table.operations.map((spec, i) => ({ signs: spec.signs, permutation: abelianPermutations[i]! })),
  );
  const operations: SymmetryOperation[] = raw.map((op, i) => {
    const label = labels[i]!;
    return {
      label: label.label,
      kind: label.kind,
      n: label.n,
      k: label.k,
      axis: label.axis ? matVec(rotation, label.axis) : null,
      matrix: toStandard(op.matrix),
      permutation: op.permutation.map((j) => j + 1),
      maxDeviationAngstrom: op.maxDeviationAngstrom,
    };
  });
  return {
    pointGroup: name.symbol,
    order: name.order,
    isLinear: false,
    isAtom: false,
    toleranceAngstrom: tol,
    operations,
    abelianSubgroup: abelianFromSpecs(choice.symbol, abelianPermutations),
    equivalentAtomSets: orbits(
      atoms.length,
      raw.map((op) => op.permutation),
    ),
    abelianEquivalentAtomSets: orbits(atoms.length, abelianPermutations),
    rotation,
    centreOfMassAngstrom: com,
    standardPositionsAngstrom: standard,
    maxSymmetrizationShiftAngstrom: maxShift,
  };
}
