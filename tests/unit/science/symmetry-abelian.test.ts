import { matVec, sub } from "@shared/science/geometry/linear-algebra";
import { ABELIAN_TABLES, analyzeSymmetry } from "@shared/science/symmetry";
import { describe, expect, it } from "vitest";
import { REFERENCE_MOLECULES, type ReferenceAtom } from "./fixtures/reference-molecules";
import { toTarget } from "./support/symmetry-checks";

const molecule = (name: string) => REFERENCE_MOLECULES.find((m) => m.name === name)!.atoms;
const analyze = (atoms: ReferenceAtom[]) => analyzeSymmetry(toTarget(atoms));

describe("Abelian character tables", () => {
  // Irreps in the order of Cotton's character tables (Appendix IIA), as used by quantum-chemistry codes.
  it.each([
    ["D2h", ["Ag", "B1g", "B2g", "B3g", "Au", "B1u", "B2u", "B3u"]],
    ["C2v", ["A1", "A2", "B1", "B2"]],
    ["C2h", ["Ag", "Bg", "Au", "Bu"]],
    ["D2", ["A", "B1", "B2", "B3"]],
    ["Cs", ["A'", 'A"']],
    ["Ci", ["Ag", "Au"]],
    ["C2", ["A", "B"]],
    ["C1", ["A"]],
  ] as const)("%s irreps in Cotton order", (symbol, irreps) => {
    expect(ABELIAN_TABLES[symbol].irreps.map((i) => i.name)).toEqual(irreps);
  });

  it.each(Object.values(ABELIAN_TABLES).map((t) => [t.symbol, t] as const))(
    "%s characters follow from the basis functions and are orthogonal",
    (_, table) => {
      const h = table.operations.length;
      for (const irrep of table.irreps) {
        // χ(op) of a monomial basis function = product of the signs of its coordinates under diag(s).
        const expected = table.operations.map((op) =>
          [...irrep.basisFunction.replace("1", "")].reduce((acc, c) => acc * op.signs["xyz".indexOf(c)]!, 1),
        );
        expect(irrep.characters).toEqual(expected);
      }
      // Great orthogonality theorem for one-dimensional irreps: Σ χᵢχⱼ = h δᵢⱼ.
      for (const a of table.irreps) {
        for (const b of table.irreps) {
          const sum = a.characters.reduce((acc, x, k) => acc + x * b.characters[k]!, 0);
          expect(sum).toBe(a === b ? h : 0);
        }
      }
    },
  );
});

describe("standard orientation", () => {
  it("maps input to standard coordinates by rotation·(r − R_cm) and keeps the Abelian operations exact", () => {
    for (const m of REFERENCE_MOLECULES) {
      const atoms = toTarget(m.atoms);
      const analysis = analyzeSymmetry(atoms);
      atoms.forEach((atom, i) => {
        const expected = matVec(analysis.rotation, sub(atom.positionAngstrom, analysis.centreOfMassAngstrom));
        for (let k = 0; k < 3; k++)
          expect(analysis.standardPositionsAngstrom[i]![k]).toBeCloseTo(expected[k]!, 9);
      });
      for (const op of analysis.abelianSubgroup.operations) {
        analysis.standardPositionsAngstrom.forEach((p, i) => {
          const q = analysis.standardPositionsAngstrom[op.permutation[i]! - 1]!;
          for (let k = 0; k < 3; k++) expect(Math.abs(op.signs[k]! * p[k]! - q[k]!)).toBeLessThan(1e-12);
        });
      }
    }
  });

  it("puts H2O in the yz plane with z along C2 (Mulliken convention: 1b1 is out of plane)", () => {
    const a = analyze(molecule("H2O"));
    expect(a.abelianSubgroup.symbol).toBe("C2v");
    for (const p of a.standardPositionsAngstrom) expect(p[0]).toBe(0);
    expect(a.standardPositionsAngstrom[0]![1]).toBe(0); // O on the z axis
  });

  it("puts BF3 (D3h → C2v) in the yz plane with B and one F on the z axis", () => {
    const a = analyze(molecule("BF3"));
    for (const p of a.standardPositionsAngstrom) expect(Math.abs(p[0])).toBeLessThan(1e-12);
    const onZ = a.standardPositionsAngstrom.filter((p) => Math.abs(p[1]) < 1e-9);
    expect(onZ).toHaveLength(2);
  });

  it("orients ethylene with C=C along z and x perpendicular to the plane", () => {
    const a = analyze(molecule("C2H4"));
    for (const p of a.standardPositionsAngstrom) expect(p[0]).toBe(0);
    const carbons = a.standardPositionsAngstrom.slice(0, 2);
    for (const p of carbons) expect(Math.abs(p[1])).toBeLessThan(1e-12);
    expect(Math.abs(carbons[0]![2])).toBeCloseTo(1.339 / 2, 9);
  });

  it("orients benzene with z along C6 and x through atoms", () => {
    const a = analyze(molecule("C6H6"));
    for (const p of a.standardPositionsAngstrom) expect(Math.abs(p[2])).toBeLessThan(1e-12);
    expect(a.standardPositionsAngstrom.filter((p) => Math.abs(p[1]) < 1e-9)).toHaveLength(4);
    // In D2h the six carbons split into the pair on x and the other four; likewise the hydrogens.
    expect(a.abelianEquivalentAtomSets.map((s) => s.length).sort()).toEqual([2, 2, 4, 4]);
  });

  it("picks the D2h of XeF4 whose C2 axes pass through the F atoms", () => {
    const xef4 = [
      { symbol: "Xe", position: [0, 0, 0] as [number, number, number] },
      ...[0, 1, 2, 3].map((k) => ({
        symbol: "F",
        position: [1.95 * Math.cos((k * Math.PI) / 2 + 0.3), 1.95 * Math.sin((k * Math.PI) / 2 + 0.3), 0] as [
          number,
          number,
          number,
        ],
      })),
    ];
    const a = analyze(xef4);
    expect(a.pointGroup).toBe("D4h");
    expect(a.abelianSubgroup.symbol).toBe("D2h");
    const onAxes = a.standardPositionsAngstrom.filter((p) => Math.abs(p[0]) < 1e-9 || Math.abs(p[1]) < 1e-9);
    expect(onAxes).toHaveLength(5);
  });

  it("puts the mirror plane of a Cs molecule in xy", () => {
    const hod = molecule("H2O").map((atom, i) => (i === 2 ? { ...atom, massNumber: 2 } : atom));
    const a = analyze(hod);
    expect(a.abelianSubgroup.symbol).toBe("Cs");
    for (const p of a.standardPositionsAngstrom) expect(p[2]).toBe(0);
  });

  it("puts z along the C2 axis of staggered ethane's C2h subgroup and keeps one σh", () => {
    const a = analyze(molecule("C2H6 (staggered)"));
    expect(a.abelianSubgroup.operations.map((op) => op.label)).toEqual(["E", "C2(z)", "i", "σ(xy)"]);
    // The C2 axis bisects the C–C bond: both carbons lie in the σh (xy) plane.
    for (const p of a.standardPositionsAngstrom.slice(0, 2)) expect(Math.abs(p[2])).toBeLessThan(1e-12);
  });

  it("puts linear molecules on the z axis", () => {
    for (const name of ["CO2", "HCN"]) {
      const a = analyze(molecule(name));
      for (const p of a.standardPositionsAngstrom) {
        expect(p[0]).toBe(0);
        expect(p[1]).toBe(0);
      }
    }
    const co2 = analyze(molecule("CO2"));
    expect(co2.equivalentAtomSets).toEqual([[1], [2, 3]]);
    expect(co2.standardPositionsAngstrom[1]![2]).toBeCloseTo(-co2.standardPositionsAngstrom[2]![2], 15);
  });
});
