/**
 * The generated set of molecules shared by the pymatgen and psi4 cross-checks: the reference molecules,
 * isotopologues, synthetic molecules of many point groups and randomly rotated, translated and reordered
 * copies (fixed seed).
 */

import { add, matVec } from "@shared/science/geometry/linear-algebra";
import { buildTarget, type TargetAtom } from "@shared/science/geometry/target";
import { methane, REFERENCE_MOLECULES, type ReferenceAtom } from "../fixtures/reference-molecules";
import { syntheticMolecule } from "./point-group-builders";
import { mulberry32, randomPermutation, randomRotation, randomTranslation } from "./random";

export interface CrosscheckCase {
  name: string;
  atoms: TargetAtom[];
}

const toAtoms = (atoms: readonly ReferenceAtom[]) =>
  buildTarget(
    atoms.map((a) => ({ symbol: a.symbol, massNumber: a.massNumber ?? null, positionAngstrom: a.position })),
  );

export const SYNTHETIC_GROUPS = [
  "C3",
  "C4",
  "C5v",
  "C6v",
  "C3h",
  "C4h",
  "D3",
  "D4",
  "D5h",
  "D6h",
  "D3d",
  "D4d",
  "D5d",
  "S4",
  "S6",
  "S8",
  "S10",
  "T",
  "O",
  "Oh",
];

/** Builds the set; `copies` randomly moved copies of each reference molecule (seed 4242). */
export function crosscheckCases(copies = 1): CrosscheckCase[] {
  const water = REFERENCE_MOLECULES.find((m) => m.name === "H2O")!.atoms;
  const cases: CrosscheckCase[] = [
    ...REFERENCE_MOLECULES.map((m) => ({ name: m.name, atoms: toAtoms(m.atoms) })),
    { name: "CH3D", atoms: toAtoms(methane([2])) },
    { name: "CH2D2", atoms: toAtoms(methane([2, 2])) },
    { name: "HOD", atoms: toAtoms(water.map((a, i) => (i === 2 ? { ...a, massNumber: 2 } : a))) },
    ...SYNTHETIC_GROUPS.map((g) => ({ name: `synthetic ${g}`, atoms: toAtoms(syntheticMolecule(g)) })),
  ];
  const random = mulberry32(4242);
  for (let copy = 0; copy < copies; copy++) {
    for (const m of REFERENCE_MOLECULES) {
      const rotation = randomRotation(random);
      const shift = randomTranslation(random);
      const order = randomPermutation(random, m.atoms.length);
      const moved = order.map((i) => ({
        ...m.atoms[i]!,
        position: add(matVec(rotation, m.atoms[i]!.position), shift),
      }));
      cases.push({ name: `${m.name} (moved ${copy + 1})`, atoms: toAtoms(moved) });
    }
  }
  return cases;
}
