import { BOHR_RADIUS_ANGSTROM } from "@shared/science/constants";
import { ScienceInputError } from "@shared/science/errors";
import {
  buildTarget,
  centreOfMass,
  classifyRotor,
  dipoleFromPartialCharges,
  electronCount,
  hillFormula,
  inertiaTensor,
  inspectTarget,
  jacobiEigenSymmetric,
  nuclearRepulsionHartree,
  principalAxes,
  rayAsymmetry,
  recentre,
  resolveMultiplicity,
  rotationalConstants,
  shiftDipoleOrigin,
} from "@shared/science/geometry";
import type { Vec3 } from "@shared/science/geometry/linear-algebra";
import { describe, expect, it } from "vitest";
import { REFERENCE_MOLECULES } from "./fixtures/reference-molecules";
import { mulberry32 } from "./support/random";

const target = (atoms: { symbol: string; massNumber?: number; position: Vec3 }[]) =>
  buildTarget(
    atoms.map((a) => ({ symbol: a.symbol, massNumber: a.massNumber ?? null, positionAngstrom: a.position })),
  );
const molecule = (name: string) => REFERENCE_MOLECULES.find((m) => m.name === name)!.atoms;
const relative = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe("Jacobi eigensolver", () => {
  it("diagonalises random symmetric matrices: A v = λ v to 1e-12 and orthonormal vectors", () => {
    const random = mulberry32(20240611);
    for (let trial = 0; trial < 20; trial++) {
      const n = 3 + (trial % 3);
      const a = Array.from({ length: n }, () => new Array<number>(n).fill(0));
      for (let i = 0; i < n; i++) for (let j = i; j < n; j++) a[i]![j] = a[j]![i] = 2 * random() - 1;
      const { values, vectors } = jacobiEigenSymmetric(a);
      for (let k = 0; k < n; k++) {
        const v = vectors[k]!;
        for (let i = 0; i < n; i++) {
          const av = a[i]!.reduce((acc, aij, j) => acc + aij * v[j]!, 0);
          expect(Math.abs(av - values[k]! * v[i]!)).toBeLessThan(1e-12);
        }
        for (let l = 0; l < n; l++) {
          const d = v.reduce((acc, x, i) => acc + x * vectors[l]![i]!, 0);
          expect(Math.abs(d - (k === l ? 1 : 0))).toBeLessThan(1e-12);
        }
      }
      expect([...values].sort((p, q) => p - q)).toEqual(values);
    }
  });
});

describe("centre of mass and inertia", () => {
  it("puts the centre of mass of HD at m_D·r/(m_H + m_D) (analytic, 1e-12 Å)", () => {
    const atoms = target([
      { symbol: "H", position: [0, 0, 0] },
      { symbol: "H", massNumber: 2, position: [0, 0, 0.7414] },
    ]);
    const [mH, mD] = [atoms[0]!.massU, atoms[1]!.massU];
    expect(centreOfMass(atoms)[2]).toBeCloseTo((mD * 0.7414) / (mH + mD), 12);
    expect(centreOfMass(recentre(atoms)).map((c) => Math.abs(c) < 1e-14)).toEqual([true, true, true]);
  });

  it("gives a diatomic moment μr² and a symmetric tensor", () => {
    const atoms = target([
      { symbol: "C", position: [0, 0, 0] },
      { symbol: "O", position: [0, 0, 1.128323] },
    ]);
    const mu = (atoms[0]!.massU * atoms[1]!.massU) / (atoms[0]!.massU + atoms[1]!.massU);
    const { momentsUAngstrom2 } = principalAxes(atoms);
    expect(momentsUAngstrom2[0]).toBeLessThan(1e-12);
    expect(relative(momentsUAngstrom2[1], mu * 1.128323 ** 2)).toBeLessThan(1e-12);
    const t = inertiaTensor(target(molecule("H2O2")));
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(t[i]![j]).toBeCloseTo(t[j]![i]!, 14);
  });

  it("satisfies the perpendicular-axis theorem I_C = I_A + I_B for planar benzene (1e-12 relative)", () => {
    const [a, b, c] = principalAxes(target(molecule("C6H6"))).momentsUAngstrom2;
    expect(relative(c, a + b)).toBeLessThan(1e-12);
  });
});

describe("rotational constants", () => {
  it("uses B[MHz]·I[u·Å²] = 505 379.0 (common practice conversion factor, from memory; 1e-6)", () => {
    const { mhz } = rotationalConstants([0, 10, 10]);
    expect(relative(mhz[1]! * 10, 505379.0)).toBeLessThan(1e-6);
    expect(mhz[0]).toBeNull();
  });

  it("reproduces B_e of ¹²C¹⁶O = 1.93128 cm⁻¹ at r_e = 1.128323 Å (Huber & Herzberg 1979, from memory; 1e-4)", () => {
    const atoms = target([
      { symbol: "C", position: [0, 0, 0] },
      { symbol: "O", position: [0, 0, 1.128323] },
    ]);
    const { cm1 } = rotationalConstants(principalAxes(atoms).momentsUAngstrom2);
    expect(relative(cm1[1]!, 1.93128)).toBeLessThan(1e-4);
    expect(cm1[2]).toBe(cm1[1]);
  });

  it("reproduces B_e of H₂ = 60.853 cm⁻¹ at r_e = 0.74144 Å (Huber & Herzberg, from memory; 1e-4)", () => {
    const atoms = target([
      { symbol: "H", position: [0, 0, 0] },
      { symbol: "H", position: [0, 0, 0.74144] },
    ]);
    const { cm1 } = rotationalConstants(principalAxes(atoms).momentsUAngstrom2);
    expect(relative(cm1[1]!, 60.853)).toBeLessThan(1e-4);
  });

  it("classifies rotors from moments and gives Ray's κ = ∓1 for symmetric tops (definition)", () => {
    expect(classifyRotor([0, 0, 0])).toBe("atom");
    expect(classifyRotor([0, 5, 5])).toBe("linear");
    expect(classifyRotor([3, 3, 3])).toBe("spherical");
    expect(classifyRotor([1, 4, 4])).toBe("prolate");
    expect(classifyRotor([2, 2, 4])).toBe("oblate");
    expect(classifyRotor([1, 2, 3])).toBe("asymmetric");
    expect(rayAsymmetry(rotationalConstants([1, 4, 4]).cm1)).toBeCloseTo(-1, 12);
    expect(rayAsymmetry(rotationalConstants([2, 2, 4]).cm1)).toBeCloseTo(1, 12);
  });

  it.each([
    ["CO2", "linear"],
    ["CH4", "spherical"],
    ["SF6", "spherical"],
    ["NH3", "oblate"],
    ["C6H6", "oblate"],
    ["C2H6 (staggered)", "prolate"],
    ["C3H4 (allene)", "prolate"],
    ["H2O", "asymmetric"],
  ])("calls %s a %s rotor (textbook)", (name, rotor) => {
    const atoms = molecule(name).map((a) => ({ symbol: a.symbol, positionAngstrom: a.position }));
    expect(inspectTarget({ atoms }).rotorType).toBe(rotor);
  });
});

describe("electrons and spin", () => {
  const water = target(molecule("H2O"));

  it("counts electrons Σ Z − Q", () => {
    expect(electronCount(water, 0)).toBe(10);
    expect(electronCount(water, 1)).toBe(9);
    expect(electronCount(water, -1)).toBe(11);
  });

  it("rejects fractional charges and charges beyond the nuclear charge", () => {
    expect(() => electronCount(water, 0.5)).toThrow(/integer/);
    expect(() => electronCount(water, 11)).toThrow(/leaves -1 electrons/);
  });

  it("defaults to the lowest multiplicity and checks parity", () => {
    expect(resolveMultiplicity(10)).toBe(1);
    expect(resolveMultiplicity(9)).toBe(2);
    expect(resolveMultiplicity(16, 3)).toBe(3); // O2 ground state is a triplet
    expect(() => resolveMultiplicity(10, 2)).toThrow(/impossible with 10 electrons.*odd/);
    expect(() => resolveMultiplicity(9, 3)).toThrow(/even \(2, 4, 6/);
    expect(() => resolveMultiplicity(2, 5)).toThrow(/needs 4 unpaired electrons/);
    expect(() => resolveMultiplicity(2, 0)).toThrow(ScienceInputError);
  });
});

describe("nuclear repulsion", () => {
  it("is 1/r for H₂ (analytic, r in bohr from CODATA 2018 a₀)", () => {
    const atoms = target([
      { symbol: "H", position: [0, 0, 0] },
      { symbol: "H", position: [0, 0, 0.74] },
    ]);
    expect(nuclearRepulsionHartree(atoms)).toBeCloseTo(BOHR_RADIUS_ANGSTROM / 0.74, 14);
  });

  it("matches psi4 1.3.2 for H₂O at O(0,0,0.1), H(0,±0.75,−0.5) Å: 9.168101681359 E_h (1e-8 relative; psi4 uses CODATA 2014 a₀)", () => {
    const atoms = target([
      { symbol: "O", position: [0, 0, 0.1] },
      { symbol: "H", position: [0, 0.75, -0.5] },
      { symbol: "H", position: [0, -0.75, -0.5] },
    ]);
    expect(relative(nuclearRepulsionHartree(atoms), 9.168101681359)).toBeLessThan(1e-8);
  });
});

describe("dipole of a charged target", () => {
  const atoms = target([
    { symbol: "N", position: [0.1, -0.2, 0.3] },
    { symbol: "H", position: [1.1, 0.4, -0.2] },
    { symbol: "O", position: [-0.9, 0.5, 0.8] },
  ]);
  const charges = [0.7, 0.6, -0.3]; // Σq = +1: a cation

  it("d(R_cm) from partial charges equals the origin dipole moved by d' = d − Q·R (definition)", () => {
    const aboutCom = dipoleFromPartialCharges(atoms, charges, 1);
    const aboutOrigin: Vec3 = [0, 0, 0];
    atoms.forEach((atom, i) => {
      for (let k = 0; k < 3; k++)
        aboutOrigin[k]! += (charges[i]! * atom.positionAngstrom[k]!) / BOHR_RADIUS_ANGSTROM;
    });
    const moved = shiftDipoleOrigin(aboutOrigin, 1, [0, 0, 0], centreOfMass(atoms));
    for (let k = 0; k < 3; k++) expect(moved.atomicUnits[k]).toBeCloseTo(aboutCom.atomicUnits[k]!, 12);
    expect(aboutCom.totalChargeE).toBeCloseTo(1, 12);
  });

  it("leaves the dipole of a neutral system unchanged by a shift", () => {
    const d: Vec3 = [0.3, -0.1, 0.7];
    expect(shiftDipoleOrigin(d, 0, [0, 0, 0], [5, 6, 7]).atomicUnits).toEqual(d);
  });

  it("converts 1 e·Å to 4.80320 D (CODATA-derived value, from memory; 1e-5 relative)", () => {
    const d = shiftDipoleOrigin([1 / BOHR_RADIUS_ANGSTROM, 0, 0], 0, [0, 0, 0], [0, 0, 0]);
    expect(relative(d.magnitudeDebye, 4.8032)).toBeLessThan(1e-5);
  });

  it("rejects charges that do not add up to the target charge or do not match the atoms", () => {
    expect(() => dipoleFromPartialCharges(atoms, charges, 0)).toThrow(
      /add up to 1.000000 e, not the target charge 0/,
    );
    expect(() => dipoleFromPartialCharges(atoms, [1, 0])).toThrow(/2 partial charges for 3 atoms/);
  });
});

describe("hillFormula", () => {
  // Hill order (carbon, hydrogen, then alphabetical; without carbon all alphabetical) is common practice
  // (E. A. Hill, J. Am. Chem. Soc. 22, 478 (1900)); isotopes other than the most abundant natural one are
  // written with their mass number in brackets, as in IUPAC's isotopologue notation (from memory).
  const atom = (symbol: string, massNumber: number) => ({ symbol, massNumber });
  it.each([
    ["water", [atom("O", 16), atom("H", 1), atom("H", 1)], "H2O"],
    ["heavy water", [atom("O", 16), atom("H", 2), atom("H", 2)], "[2H]2O"],
    ["semiheavy water", [atom("O", 16), atom("H", 1), atom("H", 2)], "H[2H]O"],
    ["CH3D", [atom("C", 12), atom("H", 1), atom("H", 1), atom("H", 1), atom("H", 2)], "CH3[2H]"],
    ["13CH4", [atom("C", 13), atom("H", 1), atom("H", 1), atom("H", 1), atom("H", 1)], "[13C]H4"],
    ["NF3", [atom("N", 14), atom("F", 19), atom("F", 19), atom("F", 19)], "F3N"],
  ])("%s is %s", (_name, atoms, formula) => {
    expect(hillFormula(atoms)).toBe(formula);
  });
});
