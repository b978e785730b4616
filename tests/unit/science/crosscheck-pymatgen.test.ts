import { analyzeSymmetry } from "@shared/science/symmetry";
import { describe, expect, it } from "vitest";
import { pymatgenPointGroups } from "./support/crosscheck";
import { crosscheckCases } from "./support/crosscheck-cases";

/**
 * Point groups against pymatgen's PointGroupAnalyzer (Debian python3-pymatgen 2022.11.7), an independent
 * implementation, on the generated set. pymatgen runs with a 0.01 Å distance tolerance (ours is 0.01 Å
 * too) and a 1e-5 inertia-eigenvalue tolerance (see pymatgenPointGroups for why the default 0.01 misleads
 * it on near-spherical tops). Isotopes: see tests/unit/science/support/crosscheck.py.
 * Operation counts are compared except for S2n: that pymatgen version names S2n after testing the
 * rotoreflection but keeps only the n rotations in its operation list (analyzer.py, _proc_cyclic).
 */
describe("cross-check: point groups vs pymatgen", () => {
  it("agrees on the point group and the number of operations", { timeout: 180_000 }, () => {
    const cases = crosscheckCases(1);
    const reference = pymatgenPointGroups(cases, 0.01, 1e-5);
    expect(reference).toHaveLength(cases.length);
    const disagreements: string[] = [];
    cases.forEach((c, i) => {
      const ours = analyzeSymmetry(c.atoms);
      const theirs = reference[i]!;
      expect(theirs.name).toBe(c.name);
      if (ours.pointGroup !== theirs.pointGroup)
        disagreements.push(`${c.name}: ${ours.pointGroup} vs ${theirs.pointGroup}`);
      if (
        theirs.operations !== null &&
        !theirs.pointGroup.startsWith("S") &&
        ours.order !== theirs.operations
      ) {
        disagreements.push(`${c.name}: order ${ours.order} vs ${theirs.operations} operations`);
      }
    });
    expect(disagreements).toEqual([]);
  });
});
