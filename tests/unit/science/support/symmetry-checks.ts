/**
 * Independent checks of a symmetry analysis: every reported operation is orthogonal, maps each atom onto
 * an atom of the same kind (found here by nearest-neighbour search, not by trusting the reported
 * permutation), and the operations are closed under multiplication.
 */
import {
  determinant,
  matMul,
  matVec,
  maxAbsDifference,
  transpose,
} from "@shared/science/geometry/linear-algebra";
import { buildTarget, isotopeLabel, type TargetAtom } from "@shared/science/geometry/target";
import type { SymmetryAnalysis } from "@shared/science/symmetry";
import { expect } from "vitest";
import type { ReferenceAtom } from "../fixtures/reference-molecules";

export function toTarget(atoms: readonly ReferenceAtom[]): TargetAtom[] {
  return buildTarget(
    atoms.map((a) => ({ symbol: a.symbol, massNumber: a.massNumber ?? null, positionAngstrom: a.position })),
  );
}

/** Largest distance from a transformed atom to the nearest atom of its kind, over all operations (Å). */
export function worstOperationDeviation(analysis: SymmetryAnalysis, atoms: readonly TargetAtom[]): number {
  const kinds = atoms.map(isotopeLabel);
  const positions = analysis.standardPositionsAngstrom;
  let worst = 0;
  for (const op of analysis.operations) {
    const used = new Set<number>();
    positions.forEach((p, i) => {
      const image = matVec(op.matrix, p);
      let best = Number.POSITIVE_INFINITY;
      let bestJ = -1;
      positions.forEach((q, j) => {
        if (kinds[j] !== kinds[i]) return;
        const d = Math.hypot(image[0] - q[0], image[1] - q[1], image[2] - q[2]);
        if (d < best) {
          best = d;
          bestJ = j;
        }
      });
      used.add(bestJ);
      worst = Math.max(worst, best);
    });
    // A symmetry operation permutes the atoms: every atom is the image of exactly one atom.
    expect(used.size).toBe(atoms.length);
  }
  return worst;
}

/** Orthogonality, determinant matching the kind, and closure of the operation set (matrix tolerance). */
export function expectGroupStructure(analysis: SymmetryAnalysis, matrixTolerance = 1e-6): void {
  const ops = analysis.operations;
  for (const op of ops) {
    expect(
      maxAbsDifference(matMul(op.matrix, transpose(op.matrix)), [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, 1],
      ]),
    ).toBeLessThan(matrixTolerance);
    const det = determinant(op.matrix);
    expect(Math.round(det)).toBe(op.kind === "E" || op.kind === "C" ? 1 : -1);
  }
  if (ops.length > 48) return; // closure of Ih (14 400 products) is checked through the permutations
  for (const a of ops) {
    for (const b of ops) {
      const product = matMul(a.matrix, b.matrix);
      // The product is one of the operations: the nearest of them is within the tolerance.
      expect(Math.min(...ops.map((c) => maxAbsDifference(c.matrix, product)))).toBeLessThan(matrixTolerance);
    }
  }
}
