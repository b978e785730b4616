import { ScienceInputError } from "@shared/science/errors";
import { buildTarget, parseGeometry } from "@shared/science/geometry";
import { describe, expect, it } from "vitest";

const XYZ = `3
water
O 0.0 0.0 0.1173
H 0.0 0.7569 -0.4692
H@2 0.0 -0.7569 -0.4692
`;

function errorOf(run: () => unknown): ScienceInputError {
  try {
    run();
  } catch (error) {
    if (error instanceof ScienceInputError) return error;
    throw error;
  }
  throw new Error("expected a ScienceInputError");
}

describe("parseGeometry", () => {
  it("reads an XYZ file with the isotope marking", () => {
    const parsed = parseGeometry(XYZ);
    expect(parsed.format).toBe("xyz");
    expect(parsed.comment).toBe("water");
    expect(parsed.atoms.map((a) => [a.symbol, a.massNumber, a.line])).toEqual([
      ["O", null, 3],
      ["H", null, 4],
      ["H", 2, 5],
    ]);
    expect(parsed.atoms[1]!.positionAngstrom).toEqual([0, 0.7569, -0.4692]);
  });

  it("reads a plain list with comments, blank lines, D/T, atomic numbers and Fortran exponents", () => {
    const parsed = parseGeometry(
      "# methanol fragment\n\n6 0 0 0\nD 1.09D0 0 0\nt 0 1.09e0 0\nc@13 0 0 -1.4\n",
    );
    expect(parsed.format).toBe("list");
    expect(parsed.atoms.map((a) => `${a.symbol}@${a.massNumber}`)).toEqual(["C@null", "H@2", "H@3", "C@13"]);
    expect(parsed.atoms[1]!.positionAngstrom[0]).toBe(1.09);
  });

  it("reports the line of a malformed coordinate", () => {
    const error = errorOf(() => parseGeometry("2\n\nH 0 0 0\nH 0 zero 0.74\n"));
    expect(error.message).toMatch(/^Line 4: y coordinate "zero"/);
    expect(error.details).toMatchObject({ line: 4 });
  });

  it("reports the line of an unknown element and of a wrong field count", () => {
    expect(errorOf(() => parseGeometry("Xq 0 0 0")).message).toMatch(/^Line 1: unknown element symbol "Xq"/);
    expect(errorOf(() => parseGeometry("H 0 0\n")).message).toMatch(
      /^Line 1: expected "Symbol x y z" \(4 fields\), found 3/,
    );
    expect(errorOf(() => parseGeometry("H1 0 0 0")).message).toMatch(
      /^Line 1: "H1" is not an element symbol/,
    );
  });

  it("checks the XYZ atom count against the atom lines", () => {
    expect(errorOf(() => parseGeometry("3\nc\nH 0 0 0\nH 0 0 1\n")).message).toMatch(
      /announces 3 atoms but only 2/,
    );
    expect(errorOf(() => parseGeometry("1\nc\nH 0 0 0\nH 0 0 1\n")).message).toMatch(
      /^Line 4: unexpected text/,
    );
  });

  it("rejects an empty input", () => {
    expect(() => parseGeometry("  \n\n")).toThrow(/empty/);
  });
});

describe("buildTarget", () => {
  it("resolves default isotopes, inline marks and overrides (overrides win)", () => {
    const atoms = buildTarget(parseGeometry(XYZ).atoms, { isotopeOverrides: { 2: 2, 3: 1 } });
    expect(atoms.map((a) => a.massNumber)).toEqual([16, 2, 1]);
    // NIST masses (from memory): ¹⁶O 15.99491461957, ²H 2.01410177812.
    expect(atoms[0]!.massU).toBeCloseTo(15.99491461957, 11);
    expect(atoms[1]!.massU).toBeCloseTo(2.01410177812, 11);
    expect(atoms.map((a) => a.index)).toEqual([1, 2, 3]);
  });

  it("names the atom in isotope errors", () => {
    const error = errorOf(() => buildTarget(parseGeometry(XYZ).atoms, { isotopeOverrides: { 1: 40 } }));
    expect(error.message).toMatch(/^Atom 1 \(O\): O-40 is not a known isotope.*Known mass numbers for O: /);
  });

  it("rejects overrides for atoms that do not exist", () => {
    expect(() => buildTarget(parseGeometry(XYZ).atoms, { isotopeOverrides: { 4: 2 } })).toThrow(
      /atoms 1 to 3 only/,
    );
  });

  it("rejects coincident atoms", () => {
    const atoms = parseGeometry("H 0 0 0\nH 0 0 0.05\n").atoms;
    expect(() => buildTarget(atoms)).toThrow(/Atoms 1 and 2 are only 0.0500 Å apart/);
  });
});
