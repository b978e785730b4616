import { BOHR_RADIUS_ANGSTROM } from "@shared/science/constants";
import { ScienceInputError } from "@shared/science/errors";
import { erfc, logGamma, regularizedUpperGamma } from "@shared/science/quadrature/incomplete-gamma";
import {
  checkSphereRadius,
  gaussianChargeBeyond,
  gaussianTailRadiusBohr,
  requiredSphereRadius,
} from "@shared/science/sphere";
import { describe, expect, it } from "vitest";

const relative = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe("special functions", () => {
  it("ln Γ matches Γ(n) = (n−1)! and Γ(1/2) = √π (exact; 1e-13 relative)", () => {
    expect(relative(Math.exp(logGamma(5)), 24)).toBeLessThan(1e-13);
    expect(relative(Math.exp(logGamma(0.5)), Math.sqrt(Math.PI))).toBeLessThan(1e-13);
    expect(relative(Math.exp(logGamma(10.5)), 1133278.388948785)).toBeLessThan(1e-12); // Γ(10.5) = 19!!/2¹⁰·√π
  });

  it("erfc matches tabulated values (Abramowitz & Stegun table 7.1, from memory; 1e-12 relative)", () => {
    expect(relative(erfc(0.5), 0.4795001221869535)).toBeLessThan(1e-12);
    expect(relative(erfc(1), 0.15729920705028513)).toBeLessThan(1e-12);
    expect(relative(erfc(2), 0.004677734981047266)).toBeLessThan(1e-12);
    expect(relative(erfc(5), 1.5374597944280349e-12)).toBeLessThan(1e-10);
    expect(erfc(-1)).toBeCloseTo(2 - 0.15729920705028513, 14);
  });

  it("Q(1, x) = e^{−x} and Q(a+1, x) = Q(a, x) + xᵃe^{−x}/Γ(a+1) (identities; both branches)", () => {
    for (const x of [0.1, 0.9, 2, 7.5, 30]) {
      expect(relative(regularizedUpperGamma(1, x), Math.exp(-x))).toBeLessThan(1e-13);
      const a = 1.5;
      const rhs = regularizedUpperGamma(a, x) + Math.exp(a * Math.log(x) - x - logGamma(a + 1));
      expect(relative(regularizedUpperGamma(a + 1, x), rhs)).toBeLessThan(1e-12);
    }
    expect(regularizedUpperGamma(2, 0)).toBe(1);
    expect(() => regularizedUpperGamma(0, 1)).toThrow(ScienceInputError);
  });
});

describe("Gaussian charge tail", () => {
  it("for l = 0 equals erfc(x) + 2x e^{−x²}/√π with x = √(2α) ρ (closed form)", () => {
    for (const [alpha, rho] of [
      [0.05, 3],
      [0.5, 1.2],
      [2, 0.4],
    ] as const) {
      const x = Math.sqrt(2 * alpha) * rho;
      const closed = erfc(x) + ((2 * x) / Math.sqrt(Math.PI)) * Math.exp(-x * x);
      expect(relative(gaussianChargeBeyond(alpha, rho), closed)).toBeLessThan(1e-12);
    }
  });

  it("tail radius inverts the charge fraction and grows with l and with smaller α", () => {
    const rho = gaussianTailRadiusBohr(0.03, 1e-5);
    expect(relative(gaussianChargeBeyond(0.03, rho), 1e-5)).toBeLessThan(1e-8);
    expect(gaussianTailRadiusBohr(0.03, 1e-5, 2)).toBeGreaterThan(rho);
    expect(gaussianTailRadiusBohr(0.01, 1e-5)).toBeGreaterThan(rho);
    // ρ ∝ α^(−1/2) at fixed tolerance (scaling of the Gaussian).
    expect(relative(gaussianTailRadiusBohr(0.12, 1e-5), rho / 2)).toBeLessThan(1e-9);
  });
});

describe("R-matrix sphere", () => {
  const positionsAngstrom: [number, number, number][] = [
    [0, 0, 0.1173],
    [0, 0.7569, -0.4692],
    [0, -0.7569, -0.4692],
  ];
  const extentBohr = Math.hypot(0.7569, 0.4692) / BOHR_RADIUS_ANGSTROM;

  it("needs the atomic extent plus the tail radius", () => {
    const result = requiredSphereRadius({ positionsAngstrom, mostDiffuseExponentBohr2: 0.03 });
    expect(result.atomicExtentBohr).toBeCloseTo(extentBohr, 12);
    expect(result.requiredRadiusBohr).toBeCloseTo(extentBohr + gaussianTailRadiusBohr(0.03, 1e-5), 12);
    expect(result.farthestAtom).toBe(2);
    expect(result.warnings).toEqual([]);
  });

  it("warns when no exponent is given", () => {
    const result = requiredSphereRadius({ positionsAngstrom });
    expect(result.tailRadiusBohr).toBe(0);
    expect(result.warnings[0]).toMatch(/encloses the nuclei only/);
  });

  it("accepts a large enough radius and warns about a small one with a leak bound", () => {
    const request = { positionsAngstrom, mostDiffuseExponentBohr2: 0.03 };
    const needed = requiredSphereRadius(request).requiredRadiusBohr;
    const good = checkSphereRadius(needed + 0.5, request);
    expect(good.ok).toBe(true);
    expect(good.leakedChargeBound!).toBeLessThan(1e-5);
    expect(good.warnings).toEqual([]);
    const small = checkSphereRadius(10, request);
    expect(small.ok).toBe(false);
    expect(small.leakedChargeBound!).toBeCloseTo(gaussianChargeBeyond(0.03, 10 - extentBohr), 12);
    expect(small.warnings[0]).toMatch(/too small.*use at least/);
    const tiny = checkSphereRadius(1, request);
    expect(tiny.leakedChargeBound).toBe(1);
    expect(tiny.warnings[0]).toMatch(/does not even enclose atom 2/);
  });

  it("validates its inputs", () => {
    expect(() => requiredSphereRadius({ positionsAngstrom: [] })).toThrow(/Invalid sphere radius request/);
    expect(() => requiredSphereRadius({ positionsAngstrom, mostDiffuseExponentBohr2: -1 })).toThrow(
      ScienceInputError,
    );
    expect(() => requiredSphereRadius({ positionsAngstrom, chargeTolerance: 1 })).toThrow(ScienceInputError);
    expect(() => checkSphereRadius(0, { positionsAngstrom })).toThrow(/positive number of bohr/);
  });
});
