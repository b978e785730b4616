import { analyzeSymmetry } from "@shared/science/symmetry";
import { describe, expect, it } from "vitest";
import { groupOrder, syntheticMolecule } from "./support/point-group-builders";
import { expectGroupStructure, toTarget, worstOperationDeviation } from "./support/symmetry-checks";

/**
 * Every point-group family, built as orbits of generic atoms under textbook generators. Expected Abelian
 * subgroups: the largest subgroup of D2h each group contains (worked out from the group elements, e.g. D3d
 * holds C2′, σd ⟂ C2′ and i = C2h; S10 holds only i = Ci); where C2v and D2 tie (D2d, D4d, D6d, Td), C2v
 * is the common-practice choice.
 * Expected orders: |Cn| = n, |Cnv| = |Cnh| = |Dn| = |S2n| = 2n, |Dnh| = |Dnd| = 4n, |T| = 12,
 * |Td| = |Th| = |O| = 24, |Oh| = 48, |I| = 60, |Ih| = 120.
 */
const CASES: [string, number, string][] = [
  ["C1", 1, "C1"],
  ["Cs", 2, "Cs"],
  ["Ci", 2, "Ci"],
  ["C2", 2, "C2"],
  ["C3", 3, "C1"],
  ["C4", 4, "C2"],
  ["C5", 5, "C1"],
  ["C6", 6, "C2"],
  ["C2v", 4, "C2v"],
  ["C3v", 6, "Cs"],
  ["C4v", 8, "C2v"],
  ["C5v", 10, "Cs"],
  ["C6v", 12, "C2v"],
  ["C2h", 4, "C2h"],
  ["C3h", 6, "Cs"],
  ["C4h", 8, "C2h"],
  ["C5h", 10, "Cs"],
  ["C6h", 12, "C2h"],
  ["D2", 4, "D2"],
  ["D3", 6, "C2"],
  ["D4", 8, "D2"],
  ["D5", 10, "C2"],
  ["D6", 12, "D2"],
  ["D2h", 8, "D2h"],
  ["D3h", 12, "C2v"],
  ["D4h", 16, "D2h"],
  ["D5h", 20, "C2v"],
  ["D6h", 24, "D2h"],
  ["D2d", 8, "C2v"],
  ["D3d", 12, "C2h"],
  ["D4d", 16, "C2v"],
  ["D5d", 20, "C2h"],
  ["D6d", 24, "C2v"],
  ["S4", 4, "C2"],
  ["S6", 6, "Ci"],
  ["S8", 8, "C2"],
  ["S10", 10, "Ci"],
  ["T", 12, "D2"],
  ["Td", 24, "C2v"],
  ["Th", 24, "D2h"],
  ["O", 24, "D2"],
  ["Oh", 48, "D2h"],
  ["I", 60, "D2"],
  ["Ih", 120, "D2h"],
];

describe("synthetic molecules of every point-group family", () => {
  it.each(CASES)("%s (order %i, Abelian subgroup %s)", (group, order, abelian) => {
    expect(groupOrder(group)).toBe(order);
    const atoms = toTarget(syntheticMolecule(group));
    const analysis = analyzeSymmetry(atoms);
    expect(analysis.pointGroup).toBe(group);
    expect(analysis.order).toBe(order);
    expect(analysis.operations).toHaveLength(order);
    expect(analysis.abelianSubgroup.symbol).toBe(abelian);
    // Four seeds of different elements: four orbits of |G| atoms each.
    expect(analysis.equivalentAtomSets.map((set) => set.length)).toEqual([order, order, order, order]);
    expect(worstOperationDeviation(analysis, atoms)).toBeLessThan(1e-8);
    expectGroupStructure(analysis);
  });
});
