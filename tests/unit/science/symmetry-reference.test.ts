import { ScienceInputError } from "@shared/science/errors";
import { analyzeSymmetry } from "@shared/science/symmetry";
import { describe, expect, it } from "vitest";
import { buckminsterfullerene, methane, REFERENCE_MOLECULES } from "./fixtures/reference-molecules";
import { expectGroupStructure, toTarget, worstOperationDeviation } from "./support/symmetry-checks";

describe("reference molecules", () => {
  // Point groups: textbook assignments (Cotton, "Chemical Applications of Group Theory", ch. 3).
  // Group orders: |C2v| = 4, |C3v| = 6, |Td| = 24, |D2h| = 8, |D3h| = 12, |D6h| = 24, |Oh| = 48, |Ih| = 120,
  // |C2| = 2, |D3d| = 12, |D2d| = 8, |C1| = 1 (order of the Schoenflies groups).
  it.each(REFERENCE_MOLECULES.map((m) => [m.name, m] as const))("%s", (_, molecule) => {
    const atoms = toTarget(molecule.atoms);
    const analysis = analyzeSymmetry(atoms);
    expect(analysis.pointGroup).toBe(molecule.pointGroup);
    expect(analysis.order).toBe(molecule.order);
    expect(analysis.abelianSubgroup.symbol).toBe(molecule.abelian);
    if (molecule.order !== null) expect(analysis.operations).toHaveLength(molecule.order);
    // Each operation maps the molecule onto itself (the constructions are exact: 1e-9 Å).
    expect(worstOperationDeviation(analysis, atoms)).toBeLessThan(1e-9);
    expectGroupStructure(analysis);
  });

  it("finds the 120 operations of C60 with the expected classes: 12 C5, 12 C5², 20 C3, 15 C2, i, 12 S10, 12 S10³, 20 S6, 15 σ", () => {
    // Class structure of Ih (Cotton, character table of Ih).
    const analysis = analyzeSymmetry(toTarget(buckminsterfullerene()));
    const count = (label: string) => analysis.operations.filter((op) => op.label === label).length;
    expect([count("E"), count("C5"), count("C5^2"), count("C3"), count("C2")]).toEqual([1, 12, 12, 20, 15]);
    expect([count("i"), count("S10"), count("S10^3"), count("S6"), count("σ")]).toEqual([1, 12, 12, 20, 15]);
    expect(analysis.equivalentAtomSets).toEqual([Array.from({ length: 60 }, (_, i) => i + 1)]);
  });

  it("C60 bond lengths in the construction are 1.45 Å (6:5) and 1.40 Å (6:6)", () => {
    const atoms = buckminsterfullerene();
    const bonds: number[] = [];
    for (let i = 0; i < atoms.length; i++) {
      for (let j = i + 1; j < atoms.length; j++) {
        const d = Math.hypot(...atoms[i]!.position.map((c, k) => c - atoms[j]!.position[k]!));
        if (d < 1.6) bonds.push(d);
      }
    }
    expect(bonds).toHaveLength(90);
    expect(bonds.filter((d) => Math.abs(d - 1.45) < 1e-9)).toHaveLength(60);
    expect(bonds.filter((d) => Math.abs(d - 1.4) < 1e-9)).toHaveLength(30);
  });
});

describe("isotopic symmetry breaking", () => {
  // CH4 → CH3D → CH2D2 → CHD3: Td → C3v → C2v → C3v (common textbook example).
  it.each([
    ["CH4", [], "Td", 24, [[1], [2, 3, 4, 5]]],
    ["CH3D", [2], "C3v", 6, [[1], [2], [3, 4, 5]]],
    ["CH2D2", [2, 2], "C2v", 4, [[1], [2, 3], [4, 5]]],
    ["CHD3", [2, 2, 2], "C3v", 6, [[1], [2, 3, 4], [5]]],
    ["CH2DT", [2, 3], "Cs", 2, [[1], [2], [3], [4, 5]]],
  ] as const)("%s is %s", (_, masses, group, order, sets) => {
    const analysis = analyzeSymmetry(toTarget(methane([...masses])));
    expect(analysis.pointGroup).toBe(group);
    expect(analysis.order).toBe(order);
    expect(analysis.equivalentAtomSets).toEqual(sets);
  });

  it("HOD loses the C2 axis of H2O", () => {
    const water = REFERENCE_MOLECULES.find((m) => m.name === "H2O")!.atoms;
    const hod = water.map((a, i) => (i === 2 ? { ...a, massNumber: 2 } : a));
    expect(analyzeSymmetry(toTarget(hod)).pointGroup).toBe("Cs");
  });

  it("linear HCCD is C∞v, HCCH is D∞h", () => {
    const chain = (m: number[]) =>
      toTarget([
        { symbol: "H", massNumber: m[0], position: [0, 0, -1.66] },
        { symbol: "C", position: [0, 0, -0.6] },
        { symbol: "C", position: [0, 0, 0.6] },
        { symbol: "H", massNumber: m[1], position: [0, 0, 1.66] },
      ]);
    expect(analyzeSymmetry(chain([1, 1])).pointGroup).toBe("D∞h");
    expect(analyzeSymmetry(chain([1, 2])).pointGroup).toBe("C∞v");
  });
});

describe("tolerance", () => {
  it("accepts a distortion below the tolerance and rejects it above", () => {
    // Water with one H moved by 0.004 Å: C2v at 0.01 Å tolerance, Cs at 0.001 Å.
    const water = REFERENCE_MOLECULES.find((m) => m.name === "H2O")!.atoms;
    const distorted = water.map((a, i) =>
      i === 1
        ? { ...a, position: [a.position[0] + 0.004, a.position[1], a.position[2]] as typeof a.position }
        : a,
    );
    const atoms = toTarget(distorted);
    const loose = analyzeSymmetry(atoms, 0.01);
    expect(loose.pointGroup).toBe("C2v");
    // Reported deviations respect the documented bound (twice the tolerance for composed operations).
    expect(Math.max(...loose.operations.map((op) => op.maxDeviationAngstrom))).toBeLessThanOrEqual(0.02);
    // Symmetrized coordinates are exactly C2v-symmetric in the standard orientation.
    const [o, h1, h2] = loose.standardPositionsAngstrom;
    expect(o![0]).toBe(0);
    expect(o![1]).toBe(0);
    expect(h1![1]).toBeCloseTo(-h2![1], 15);
    expect(analyzeSymmetry(atoms, 0.001).pointGroup).toBe("Cs");
  });

  it("refuses tolerances outside [1e-6, 0.3] Å", () => {
    const atoms = toTarget(methane());
    expect(() => analyzeSymmetry(atoms, 0)).toThrow(ScienceInputError);
    expect(() => analyzeSymmetry(atoms, 0.5)).toThrow(/between 1e-6 and 0.3 Å/);
  });

  it("handles a single atom as Kh with the D2h operations", () => {
    const analysis = analyzeSymmetry(toTarget([{ symbol: "Ar", position: [1, 2, 3] }]));
    expect(analysis.pointGroup).toBe("Kh");
    expect(analysis.order).toBeNull();
    expect(analysis.abelianSubgroup.symbol).toBe("D2h");
    expect(analysis.standardPositionsAngstrom).toEqual([[0, 0, 0]]);
  });
});
