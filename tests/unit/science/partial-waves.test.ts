/**
 * Spherical Bessel functions, phase shifts and partial-wave cross sections.
 */
import { ScienceInputError } from "@shared/science/errors";
import {
  elasticCrossSectionBohr2,
  momentumTransferCrossSectionBohr2,
  partialWaveCrossSectionsA2,
} from "@shared/science/partial-waves/cross-sections";
import {
  hardSpherePhaseShifts,
  phaseShiftFromMatching,
  squareWellPhaseShift,
} from "@shared/science/partial-waves/phase-shifts";
import { sphericalBesselJ, sphericalBesselY } from "@shared/science/partial-waves/spherical-bessel";
import { describe, expect, it } from "vitest";

/** j_l(x) from the power series x^l Σ_k (−x²/2)^k / (k! (2l+2k+1)!!) (DLMF §10.53), summed to convergence. */
function seriesJ(l: number, x: number): number {
  let doubleFactorial = 1;
  for (let m = 1; m <= 2 * l + 1; m += 2) doubleFactorial *= m;
  let term = x ** l / doubleFactorial;
  let sum = term;
  for (let k = 1; k < 200; k++) {
    term *= -(x * x) / 2 / k / (2 * l + 2 * k + 1);
    sum += term;
    if (Math.abs(term) < 1e-18 * Math.abs(sum)) break;
  }
  return sum;
}

const relative = (value: number, expected: number) => Math.abs(value - expected) / Math.abs(expected);

describe("spherical Bessel functions", () => {
  it("match the closed forms for l = 0, 1, 2 (DLMF §10.49)", () => {
    // Tolerance 1e-13 relative (skipping points within 1e-3 of a zero).
    for (const x of [0.5, 3, 10, 50]) {
      const s = Math.sin(x);
      const c = Math.cos(x);
      const j = sphericalBesselJ(2, x);
      const y = sphericalBesselY(2, x);
      const expectedJ = [s / x, s / x ** 2 - c / x, (3 / x ** 3 - 1 / x) * s - (3 * c) / x ** 2];
      const expectedY = [-c / x, -c / x ** 2 - s / x, (-3 / x ** 3 + 1 / x) * c - (3 * s) / x ** 2];
      for (let l = 0; l <= 2; l++) {
        if (Math.abs(expectedJ[l]!) > 1e-3) expect(relative(j[l]!, expectedJ[l]!)).toBeLessThan(1e-13);
        if (Math.abs(expectedY[l]!) > 1e-3) expect(relative(y[l]!, expectedY[l]!)).toBeLessThan(1e-13);
      }
    }
  });

  it("agree with the power series where Miller's downward recurrence is used (x < l), also at x = π", () => {
    // x = π is a zero of j_0, so normalisation must switch to j_1. Tolerance 1e-12 relative.
    for (const x of [0.5, 2, Math.PI, 7]) {
      const j = sphericalBesselJ(30, x);
      for (let l = 0; l <= 30; l++) {
        const expected = seriesJ(l, x);
        if (Math.abs(expected) < 1e-300 || (l === 0 && x === Math.PI)) continue;
        expect(relative(j[l]!, expected)).toBeLessThan(1e-12);
      }
    }
  });

  it("satisfy j_{l+1} y_l − j_l y_{l+1} = 1/x² on both recurrence branches (DLMF §10.50)", () => {
    // Tolerance 1e-10 relative: the products mix a tiny j with a huge y at high l.
    for (const x of [1, 10, 37.5, 120]) {
      const lMax = 60;
      const j = sphericalBesselJ(lMax + 1, x);
      const y = sphericalBesselY(lMax + 1, x);
      for (let l = 0; l <= lMax; l++) {
        if (!Number.isFinite(y[l + 1]!)) continue;
        expect(relative(j[l + 1]! * y[l]! - j[l]! * y[l + 1]!, 1 / (x * x))).toBeLessThan(1e-10);
      }
    }
  });

  it("use the small-argument series below 1e-5 and give j_0(0) = 1", () => {
    // Leading behaviour j_l(x) ≈ x^l/(2l+1)!! (DLMF §10.52); tolerance 1e-12 relative.
    const j = sphericalBesselJ(3, 1e-7);
    expect(relative(j[3]!, 1e-21 / 105)).toBeLessThan(1e-12);
    expect(Array.from(sphericalBesselJ(2, 0))).toEqual([1, 0, 0]);
    expect(sphericalBesselY(1, 0)[1]).toBe(Number.NEGATIVE_INFINITY);
    expect(() => sphericalBesselJ(2, -1)).toThrow(ScienceInputError);
  });
});

describe("hard-sphere scattering", () => {
  it("has δ_0 = −ka and σ → 4πa² at low energy", () => {
    // Source: Sakurai, Modern Quantum Mechanics, ch. 7 (hard sphere, low-energy limit). Tolerance: δ_0 exact
    // to 1e-15; σ/(4πa²) = 1 − (ka)²/3 + O((ka)⁴), so 1e-7 at ka = 1e-4.
    const radiusBohr = 2.5;
    const k = 4e-5;
    const delta = hardSpherePhaseShifts(4, k, radiusBohr);
    expect(delta[0]!).toBeCloseTo(-k * radiusBohr, 15);
    const sigma = elasticCrossSectionBohr2(k, delta);
    expect(relative(sigma, 4 * Math.PI * radiusBohr ** 2)).toBeLessThan(1e-7);
    expect(relative(momentumTransferCrossSectionBohr2(k, delta), 4 * Math.PI * radiusBohr ** 2)).toBeLessThan(
      1e-7,
    );
  });

  it("approaches the high-energy limit 2πa² (diffraction + classical)", () => {
    // Source: Sakurai, ch. 7; the approach is slow (correction ∝ (ka)^(−2/3)), so at ka = 200 the test only
    // requires 1 < σ/(2πa²) < 1.05.
    const radiusBohr = 1;
    const k = 200;
    const sigma = elasticCrossSectionBohr2(k, hardSpherePhaseShifts(300, k, radiusBohr));
    const ratio = sigma / (2 * Math.PI * radiusBohr ** 2);
    expect(ratio).toBeGreaterThan(1);
    expect(ratio).toBeLessThan(1.05);
  });
});

describe("attractive square well", () => {
  it("gives the scattering length a = R(1 − tan(κR)/(κR)) from the s-wave phase shift as k → 0", () => {
    // Source: Sakurai, ch. 7 (square well, zero-energy limit), κ = √(2V₀). a ≈ −tan δ_0 / k at k = 1e-4 with
    // effective-range corrections O(k²), tolerance 1e-6 relative. Depths below and above the first bound
    // state (a < 0 and a > 0).
    const radiusBohr = 2;
    for (const depthHartree of [0.1, 1]) {
      const kappa = Math.sqrt(2 * depthHartree);
      const expected = radiusBohr * (1 - Math.tan(kappa * radiusBohr) / (kappa * radiusBohr));
      const k = 1e-4;
      const delta = squareWellPhaseShift({ l: 0, wavenumberPerBohr: k, radiusBohr, depthHartree });
      expect(relative(-Math.tan(delta) / k, expected)).toBeLessThan(1e-6);
    }
  });

  it("gives zero phase shifts without a potential, for every l", () => {
    for (const l of [0, 1, 5]) {
      expect(squareWellPhaseShift({ l, wavenumberPerBohr: 0.7, radiusBohr: 3, depthHartree: 0 })).toBeCloseTo(
        0,
        14,
      );
    }
  });

  it("reaches the hard-sphere phase shift when the interior solution has a node at R", () => {
    // F(R) = 0 is the hard-sphere boundary condition: tan δ_l = j_l(kR)/y_l(kR). Tolerance 1e-14.
    const delta = phaseShiftFromMatching({
      l: 2,
      wavenumberPerBohr: 0.8,
      radiusBohr: 1.5,
      interiorValue: 0,
      interiorDerivativePerBohr: 1,
    });
    expect(delta).toBeCloseTo(hardSpherePhaseShifts(2, 0.8, 1.5)[2]!, 14);
  });
});

describe("partial-wave cross sections", () => {
  it("computes σ and σ_m from two phase shifts by the textbook sums", () => {
    // σ = (4π/k²)[sin²δ₀ + 3 sin²δ₁]; σ_m = (4π/k²)[sin²(δ₁ − δ₀) + 2 sin²δ₁] (δ₂ = 0). Tolerance 1e-14.
    const k = 0.6;
    const delta = [0.9, -0.25];
    const prefactor = (4 * Math.PI) / (k * k);
    expect(elasticCrossSectionBohr2(k, delta)).toBeCloseTo(
      prefactor * (Math.sin(0.9) ** 2 + 3 * Math.sin(-0.25) ** 2),
      12,
    );
    expect(momentumTransferCrossSectionBohr2(k, delta)).toBeCloseTo(
      prefactor * (Math.sin(-0.25 - 0.9) ** 2 + 2 * Math.sin(-0.25) ** 2),
      12,
    );
  });

  it("converts an eV energy to Å²: σ(E) = (4π/k²) sin²δ₀ · a₀² with k² = 2E/E_h", () => {
    // 13.605693122994 eV (one rydberg, CODATA 2018) gives k = 1 bohr⁻¹; a₀² = 0.280028520 Å² (CODATA 2018).
    const { elasticA2 } = partialWaveCrossSectionsA2(13.605693122994, [Math.PI / 2]);
    expect(elasticA2).toBeCloseTo(4 * Math.PI * 0.529177210903 ** 2, 10);
  });
});
