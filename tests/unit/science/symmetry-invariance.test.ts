import { inspectTarget } from "@shared/science/geometry";
import { add, matVec, type Vec3 } from "@shared/science/geometry/linear-algebra";
import { describe, expect, it } from "vitest";
import { REFERENCE_MOLECULES, type ReferenceAtom } from "./fixtures/reference-molecules";
import { syntheticMolecule } from "./support/point-group-builders";
import { mulberry32, randomPermutation, randomRotation, randomTranslation } from "./support/random";

const inspect = (atoms: readonly ReferenceAtom[]) =>
  inspectTarget({
    atoms: atoms.map((a) => ({
      symbol: a.symbol,
      massNumber: a.massNumber ?? null,
      positionAngstrom: a.position,
    })),
  });

/** Random rigid motion and atom reordering, optionally with uniform noise of ±noise Å per coordinate. */
function scramble(atoms: readonly ReferenceAtom[], random: () => number, noise = 0) {
  const rotation = randomRotation(random);
  const shift = randomTranslation(random);
  const order = randomPermutation(random, atoms.length);
  const moved = order.map((i) => {
    const a = atoms[i]!;
    const jitter: Vec3 = [0, 1, 2].map(() => (2 * random() - 1) * noise) as Vec3;
    return { ...a, position: add(add(matVec(rotation, a.position), shift), jitter) };
  });
  return { moved, order };
}

/** Orientation-independent fingerprint of the standard orientation: sorted (element, |x|, |y|, |z|). */
const fingerprint = (report: ReturnType<typeof inspect>) =>
  report.atoms
    .map(
      (a) => `${a.symbol}${a.massNumber} ${a.positionAngstrom.map((c) => Math.abs(c).toFixed(6)).join(" ")}`,
    )
    .sort();

const MOLECULES = [
  ...REFERENCE_MOLECULES.map((m) => ({ name: m.name, atoms: m.atoms })),
  ...["D5d", "S8", "C3h", "Th", "D4d"].map((g) => ({ name: `synthetic ${g}`, atoms: syntheticMolecule(g) })),
];

describe("invariance under rotation, translation and atom permutation (seed 1234)", () => {
  it.each(MOLECULES.map((m) => [m.name, m.atoms] as const))("%s", (_, atoms) => {
    const random = mulberry32(1234);
    const reference = inspect(atoms);
    for (let trial = 0; trial < 3; trial++) {
      const { moved, order } = scramble(atoms, random);
      const report = inspect(moved);
      expect(report.pointGroup).toBe(reference.pointGroup);
      expect(report.groupOrder).toBe(reference.groupOrder);
      expect(report.abelianSubgroup).toBe(reference.abelianSubgroup);
      expect(report.rotorType).toBe(reference.rotorType);
      // Rigid motions leave B and E_nn unchanged up to round-off (1e-9 and 1e-12 relative).
      report.rotationalConstantsCm1.forEach((b, k) => {
        const expected = reference.rotationalConstantsCm1[k]!;
        if (expected === null) expect(b).toBeNull();
        else expect(Math.abs(b! - expected) / expected).toBeLessThan(1e-9);
      });
      expect(Math.abs(report.nuclearRepulsionHartree / reference.nuclearRepulsionHartree - 1)).toBeLessThan(
        1e-12,
      );
      // Equivalent-atom sets, translated back to the original numbering.
      const back = (sets: number[][]) =>
        sets
          .map((set) => set.map((i) => order[i - 1]! + 1).sort((p, q) => p - q))
          .sort((p, q) => p[0]! - q[0]!);
      expect(back(report.equivalentAtomSets)).toEqual(reference.equivalentAtomSets);
      expect(fingerprint(report)).toEqual(fingerprint(reference));
    }
  });
});

describe("robustness to coordinate noise below the tolerance (seed 99)", () => {
  it.each(REFERENCE_MOLECULES.filter((m) => m.order !== null).map((m) => [m.name, m] as const))(
    "%s",
    (_, m) => {
      const random = mulberry32(99);
      // ±0.001 Å per coordinate: the rounding of a geometry printed with three decimals.
      const { moved } = scramble(m.atoms, random, 0.001);
      const report = inspect(moved);
      expect(report.pointGroup).toBe(m.pointGroup);
      expect(report.abelianSubgroup).toBe(m.abelian);
      expect(Math.max(...report.operations.map((op) => op.maxDeviationAngstrom))).toBeLessThanOrEqual(0.02);
      expect(report.maxSymmetrizationShiftAngstrom).toBeLessThan(0.01);
    },
  );
});
