import {
  BASIS_FAMILIES,
  basisCoverage,
  getBasisFamily,
  listBasisFamilies,
} from "@shared/science/basis-coverage";
import { ScienceInputError } from "@shared/science/errors";
import { describe, expect, it } from "vitest";

// Expectations follow the Basis Set Exchange element lists as remembered (see the data file's header):
// Pople 6-31G* up to Kr, Dunning cc-pVXZ up to Kr (not Rb and beyond, which need -PP variants), def2 up to
// Rn with ECPs from Rb (Z = 37).
describe("basis-set coverage", () => {
  it("covers water in every family", () => {
    for (const name of listBasisFamilies()) {
      const report = basisCoverage(name, ["O", "H", "H"]);
      expect(report.covered).toBe(true);
      expect(report.uncovered).toEqual([]);
    }
  });

  it("flags iodine in 6-31G* and cc-pVTZ but not in def2-TZVP, where it gets an ECP", () => {
    const symbols = ["C", "H", "H", "H", "I"];
    expect(basisCoverage("6-31G*", symbols).uncovered).toEqual([{ index: 5, symbol: "I", atomicNumber: 53 }]);
    expect(basisCoverage("cc-pVTZ", symbols).covered).toBe(false);
    const def2 = basisCoverage("def2-TZVP", symbols);
    expect(def2.covered).toBe(true);
    expect(def2.withEcp).toEqual([{ index: 5, symbol: "I", atomicNumber: 53 }]);
  });

  it("starts def2 ECPs at Rb (Z = 37), not at Kr", () => {
    const report = basisCoverage("def2-SVP", ["Kr", "Rb", "Xe"]);
    expect(report.withEcp.map((a) => a.symbol)).toEqual(["Rb", "Xe"]);
  });

  it("reports uncertain ranges separately from uncovered ones", () => {
    const report = basisCoverage("cc-pVDZ", ["K", "Ca", "Br"]);
    expect(report.uncertain.map((a) => a.symbol)).toEqual(["K"]);
    expect(report.covered).toBe(true);
    expect(basisCoverage("def2-QZVP", ["Gd"]).uncertain.map((a) => a.symbol)).toEqual(["Gd"]);
  });

  it("does not cover radon with STO-3G (H–Xe only)", () => {
    expect(basisCoverage("sto-3g", ["Rn"]).uncovered.map((a) => a.symbol)).toEqual(["Rn"]);
  });

  it("accepts aliases and any capitalisation", () => {
    expect(getBasisFamily("6-31g(d)").name).toBe("6-31G*");
    expect(getBasisFamily("6-311G(D,P)").name).toBe("6-311G**");
    expect(getBasisFamily("AUG-CC-PVQZ").name).toBe("aug-cc-pVQZ");
  });

  it("rejects unknown bases (listing known ones) and unknown elements", () => {
    expect(() => getBasisFamily("6-31G***")).toThrow(/Unknown basis set "6-31G\*\*\*". Known: STO-3G/);
    expect(() => basisCoverage("def2-SVP", ["Zz"])).toThrow(ScienceInputError);
  });

  it("keeps every uncertain range inside 1..118 and every family's ranges ordered", () => {
    for (const family of BASIS_FAMILIES) {
      for (const [lo, hi] of [...family.covered, ...family.uncertain]) {
        expect(lo).toBeGreaterThanOrEqual(1);
        expect(hi).toBeLessThanOrEqual(118);
        expect(lo).toBeLessThanOrEqual(hi);
      }
    }
    expect(listBasisFamilies()).toEqual(
      expect.arrayContaining(["cc-pV5Z", "aug-cc-pVDZ", "def2-QZVP", "6-31+G*"]),
    );
  });
});
