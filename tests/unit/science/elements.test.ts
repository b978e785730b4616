import {
  getElement,
  getElementByNumber,
  getIsotope,
  isElementSymbol,
  listElements,
} from "@shared/science/elements";
import { ScienceInputError } from "@shared/science/errors";
import { describe, expect, it } from "vitest";

describe("isotope masses", () => {
  // Expected masses: NIST "Atomic Weights and Isotopic Compositions" (AME2016-based table), quoted from
  // memory. Tolerance 1e-11 u: the table's last printed digit.
  it.each([
    ["H", 1, 1.00782503223],
    ["H", 2, 2.01410177812],
    ["C", 12, 12],
    ["C", 13, 13.00335483507],
    ["N", 14, 14.00307400443],
    ["O", 16, 15.99491461957],
  ])("%s-%i has the NIST mass", (symbol, massNumber, massU) => {
    expect(getIsotope(symbol, massNumber).massU).toBeCloseTo(massU, 11);
  });

  it("C-12 is exactly 12 u (definition of the unified atomic mass unit before 2019, kept by NIST)", () => {
    expect(getIsotope("C", 12).massU).toBe(12);
  });
});

describe("default isotope", () => {
  // Most abundant isotopes (NIST natural abundances, from memory): ¹H 99.9885 %, ¹²C 98.93 %, ³⁵Cl 75.76 %,
  // ¹¹B 80.1 %, ⁵⁶Fe 91.754 %.
  it.each([
    ["H", 1],
    ["C", 12],
    ["Cl", 35],
    ["B", 11],
    ["Fe", 56],
  ])("%s defaults to mass number %i", (symbol, massNumber) => {
    expect(getIsotope(symbol).massNumber).toBe(massNumber);
  });

  it("carries the natural abundance of the default isotope (NIST: ¹H 0.999885, ³⁵Cl 0.7576)", () => {
    expect(getIsotope("H").abundance).toBeCloseTo(0.999885, 6);
    expect(getIsotope("Cl").abundance).toBeCloseTo(0.7576, 4);
  });

  it("refuses a default for an element without natural isotopes and lists the known mass numbers", () => {
    expect(() => getIsotope("Tc")).toThrow(ScienceInputError);
    expect(() => getIsotope("Tc")).toThrow(/no naturally occurring isotope.*Known mass numbers: .*98/);
  });
});

describe("lookups and errors", () => {
  it("accepts any capitalisation of a symbol", () => {
    expect(getElement("cl").symbol).toBe("Cl");
    expect(getElement("CL").atomicNumber).toBe(17);
    expect(isElementSymbol("he")).toBe(true);
    expect(isElementSymbol("Xx")).toBe(false);
  });

  it("rejects unknown symbols", () => {
    expect(() => getElement("Xx")).toThrow(/Unknown element symbol "Xx"/);
  });

  it("rejects unknown isotopes and lists the mass numbers it knows", () => {
    try {
      getIsotope("O", 30);
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(ScienceInputError);
      expect((error as Error).message).toMatch(/O-30 is not a known isotope/);
      expect((error as Error).message).toMatch(/16, 17, 18/);
      expect((error as ScienceInputError).details).toMatchObject({ symbol: "O", massNumber: 30 });
    }
  });

  it("looks up by atomic number and rejects Z outside 1..118", () => {
    expect(getElementByNumber(8).symbol).toBe("O");
    expect(() => getElementByNumber(0)).toThrow(/known: 1 to 118/);
    expect(() => getElementByNumber(119)).toThrow(ScienceInputError);
  });

  it("lists the 118 elements in order of Z", () => {
    const all = listElements();
    expect(all).toHaveLength(118);
    expect(all.map((e) => e.atomicNumber)).toEqual(Array.from({ length: 118 }, (_, i) => i + 1));
  });
});
