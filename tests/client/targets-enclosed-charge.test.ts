/**
 * The enclosed-charge curve of the target editor (src/features/targets/lib/enclosed-charge.ts) against
 * independent computations: at zero offset the Maxwell distribution function, which is 1 − Q(3/2, 2αR²)
 * (shared/science/sphere's gaussianChargeBeyond, A&S 6.5); off centre a radial quadrature over shells
 * about the atom, each weighted by the part of the shell inside the sphere, (R² − (s − d)²)/(4 s d)
 * (Archimedes' spherical-cap area, a classical result); and the staircase of nuclear charge.
 */
import { gaussianChargeBeyond } from "@shared/science/sphere";
import { describe, expect, it } from "vitest";
import { enclosedChargeCurve, gaussianFractionInsideSphere } from "@/features/targets/lib/enclosed-charge";

/** Fraction inside by Simpson quadrature over the radial distance s from the atom (independent of erf). */
function byQuadrature(alpha: number, radius: number, offset: number): number {
  const sigma2 = 1 / (4 * alpha);
  const density = (s: number) =>
    4 * Math.PI * s * s * (2 * Math.PI * sigma2) ** -1.5 * Math.exp(-(s * s) / (2 * sigma2));
  const inside = (s: number) => {
    if (s <= radius - offset) return 1; // the whole shell is inside
    if (s >= radius + offset || s <= offset - radius) return 0; // the shell misses the sphere
    return (radius * radius - (s - offset) ** 2) / (4 * s * offset);
  };
  const upper = radius + offset + 12 * Math.sqrt(sigma2);
  // Simpson's rule piece by piece between the kinks of the cap factor, at |R − d| and R + d.
  const simpson = (a: number, b: number, n = 4000) => {
    const h = (b - a) / n;
    let sum = 0;
    for (let i = 0; i <= n; i++) {
      const s = a + i * h;
      const weight = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
      sum += weight * (s === 0 ? 0 : density(s) * inside(s));
    }
    return (sum * h) / 3;
  };
  const kinks = [0, Math.abs(radius - offset), radius + offset, upper];
  return kinks.slice(1).reduce((total, b, k) => total + simpson(kinks[k]!, b), 0);
}

describe("charge of a Gaussian inside an off-centre sphere", () => {
  it("equals 1 − Q(3/2, 2αR²) when the sphere is centred on the atom", () => {
    for (const [alpha, radius] of [
      [0.03, 5],
      [0.5, 1.2],
      [2, 0.3],
    ] as const) {
      expect(gaussianFractionInsideSphere(alpha, radius, 0)).toBeCloseTo(
        1 - gaussianChargeBeyond(alpha, radius),
        12,
      );
    }
  });

  it("agrees with a radial quadrature off centre, at offsets inside and outside the sphere (1e-7)", () => {
    for (const [alpha, radius, offset] of [
      [0.05, 6, 2],
      [0.05, 2, 6],
      [1, 3, 2.9],
      [0.2, 4, 1e-3],
    ] as const) {
      expect(gaussianFractionInsideSphere(alpha, radius, offset)).toBeCloseTo(
        byQuadrature(alpha, radius, offset),
        7,
      );
    }
  });
});

describe("enclosed charge against radius", () => {
  // Two nuclei on the z axis at ±1.5 bohr (Z = 1 and 9), ten electrons: a neutral HF-like pair.
  const bohr = 0.529177210903; // Å per bohr (CODATA 2018)
  const inspection = {
    electronCount: 10,
    atoms: [
      { atomicNumber: 1, positionAngstrom: [0, 0, 1.5 * bohr] as [number, number, number] },
      { atomicNumber: 9, positionAngstrom: [0, 0, -1.5 * bohr] as [number, number, number] },
    ],
  } as Parameters<typeof enclosedChargeCurve>[0];

  it("steps the nuclear charge at the atoms' distance and approaches every electron", () => {
    const curve = enclosedChargeCurve(inspection, 0.1);
    for (const point of curve.points) {
      expect(point.nuclearE).toBe(point.radiusBohr >= 1.5 - 1e-12 ? 10 : 0);
    }
    expect(curve.points.at(-1)!.electronicE).toBeGreaterThan(10 * (1 - 1e-3));
    expect(curve.suggestedRadiusBohr).not.toBeNull();
    // The suggested radius encloses all but 0.1 % of the electrons, and the sample before it does not.
    const index = curve.points.findIndex((p) => p.radiusBohr === curve.suggestedRadiusBohr);
    expect(10 - curve.points[index]!.electronicE).toBeLessThanOrEqual(1e-2);
    expect(10 - curve.points[index - 1]!.electronicE).toBeGreaterThan(1e-2);
  });

  it("needs a larger sphere for a more diffuse exponent", () => {
    const tight = enclosedChargeCurve(inspection, 1).suggestedRadiusBohr!;
    const diffuse = enclosedChargeCurve(inspection, 0.02).suggestedRadiusBohr!;
    expect(diffuse).toBeGreaterThan(tight);
  });
});
