/**
 * Extreme inputs to the science core: each result is either a finite, correct value or a refusal with a
 * message for the researcher (ScienceInputError), never NaN or ±Infinity (which JSON prints as null).
 */
import { ScienceInputError } from "@shared/science/errors";
import { buildTarget, inspectTarget, parseGeometry } from "@shared/science/geometry";
import { bebCrossSections } from "@shared/science/ionization/beb";
import { computeKMatrixCrossSections } from "@shared/science/kmatrix/cross-sections-from-document";
import { eigenphaseSumFromKMatrix, tMatrixFromKMatrix } from "@shared/science/kmatrix/t-matrix";
import { truncatedExponentialMoments } from "@shared/science/quadrature/exponential-moments";
import { maxwellianRateCoefficients } from "@shared/science/rates/maxwellian-rate";
import { gaussianChargeBeyond, gaussianTailRadiusBohr, requiredSphereRadius } from "@shared/science/sphere";
import { describe, expect, it } from "vitest";
import { bebReferenceA2 } from "./support/high-precision";

const relative = (value: number, expected: number) => Math.abs(value / expected - 1);

// CODATA 2018 values typed here as the external reference (k_B and e exact; m_e 9.109 383 7015e-31 kg,
// E_h 27.211 386 245 988 eV, a₀ 0.529 177 210 903 Å).
const K_B = 1.380649e-23;
const E_CHARGE = 1.602176634e-19;
const M_E = 9.1093837015e-31;
const HARTREE_EV = 27.211386245988;
const BOHR_ANGSTROM = 0.529177210903;
/** Mean Maxwellian speed √(8k_BT/(πm_e)) in cm/s, with √T taken apart so that tiny T does not underflow. */
const meanSpeed = (t: number) => Math.sqrt((8 * K_B) / (Math.PI * M_E)) * Math.sqrt(t) * 100;
const thermalEv = (t: number) => (K_B * t) / E_CHARGE;

describe("target geometry at extreme coordinates", () => {
  const farWater = "3\nwater\nO 0 0 1e200\nH 0 1e200 0\nH 1e200 0 0\n";

  it("refuses a coordinate of 1e200 Å with its line instead of NaN moments of inertia", () => {
    // regression: extreme inputs must not print null (1e200 Å squared overflowed the inertia tensor)
    expect(() => parseGeometry(farWater)).toThrow(
      /^Line 3: z coordinate 1e200 Å lies beyond ±1e6 Å\. Coordinates must be in ångström/,
    );
    const atoms = [
      { symbol: "O", positionAngstrom: [0, 0, 1e200] as [number, number, number] },
      { symbol: "H", positionAngstrom: [0, 0.76, 0] as [number, number, number] },
    ];
    expect(() => buildTarget(atoms)).toThrow(/^Atom 1 \(O\): z coordinate 1e\+200 Å lies beyond ±1e6 Å/);
    expect(() => inspectTarget({ atoms })).toThrow(ScienceInputError);
  });

  it("still computes the moment μr² of H₂ stretched to the 1e6 Å limit", () => {
    // I = μr² with μ = m(¹H)/2, m(¹H) = 1.007 825 032 23 u (NIST atomic masses, from memory); r = 1e6 Å;
    // tolerance 1e-12 relative. The coordinates are exact in binary, so only the final products round.
    const report = inspectTarget({
      atoms: [
        { symbol: "H", positionAngstrom: [0, 0, 0] },
        { symbol: "H", positionAngstrom: [0, 0, 1e6] },
      ],
    });
    expect(report.pointGroup).toBe("D∞h");
    expect(report.principalMomentsUAngstrom2[0]).toBe(0);
    expect(relative(report.principalMomentsUAngstrom2[2], (1.00782503223 / 2) * 1e12)).toBeLessThan(1e-12);
    expect(report.rotationalConstantsCm1.every((b) => b === null || Number.isFinite(b))).toBe(true);
  });
});

describe("R-matrix sphere for extremely diffuse Gaussians", () => {
  it("scales the tail radius as 1/√α down to the smallest double exponent", () => {
    // regression: extreme inputs must not print null (x/(2α) overflowed to an infinite radius at α = 5e-324)
    // The charge fraction Q(l + 3/2, 2αρ²) depends on αρ² only (module derivation), so ρ_ε·√α is the same
    // for every α; √(5e-324) = 2^-537 is exact. Tolerance 1e-12 relative (the bisection's accuracy).
    const reference = gaussianTailRadiusBohr(1, 1e-5);
    for (const alpha of [5e-324, 1e-300, 1e-100]) {
      const radius = gaussianTailRadiusBohr(alpha, 1e-5);
      expect(relative(radius * Math.sqrt(alpha), reference), `α = ${alpha}`).toBeLessThan(1e-12);
      expect(relative(gaussianChargeBeyond(alpha, radius), 1e-5), `α = ${alpha}`).toBeLessThan(1e-8);
    }
    const sphere = requiredSphereRadius({ positionsAngstrom: [[0, 0, 0]], mostDiffuseExponentBohr2: 5e-324 });
    expect(Number.isFinite(sphere.requiredRadiusBohr)).toBe(true);
  });
});

describe("BEB ionization at extreme binding energies", () => {
  it("gives the finite BEB value for a binding energy of 1e-200 eV, as evaluated at 400 digits", () => {
    // regression: extreme inputs must not print null ((R/B)² overflowed at B = 1e-200 eV; σ itself fits)
    // Reference: Kim & Rudd's formula evaluated as written with mpmath at 400 digits and CODATA 2018
    // constants (support/high-precision.py); tolerance 1e-13 relative.
    const orbitals = [
      { bindingEv: 1e-200, kineticEv: 1, occupation: 2 },
      { bindingEv: 1, kineticEv: 1.7e308, occupation: 2 },
    ];
    const energiesEv = [10, 100, 1e300];
    const result = bebCrossSections({ orbitals, energiesEv });
    const reference = bebReferenceA2(
      orbitals.flatMap((orbital) => energiesEv.map((energyEv) => ({ ...orbital, energyEv }))),
    );
    orbitals.forEach((_, o) => {
      energiesEv.forEach((energyEv, e) => {
        const expected = reference[o * energiesEv.length + e]!;
        expect(
          relative(result.orbitalA2[o]![e]!, expected),
          `orbital ${o + 1} at ${energyEv} eV`,
        ).toBeLessThan(1e-13);
      });
    });
  });

  it("keeps ordinary H₂O values unchanged by the overflow-safe evaluation", () => {
    // Same 400-digit reference; H₂O orbital constants as listed on the NIST Electron-Impact Cross Section
    // database H2O page (from memory). Tolerance 1e-13 relative, divided by t − 1 below t = 2: the bracket
    // vanishes like (t − 1) at threshold, so its terms cancel in any double-precision evaluation.
    const orbitals = [
      { bindingEv: 36.88, kineticEv: 70.71, occupation: 2 },
      { bindingEv: 12.61, kineticEv: 61.91, occupation: 2 },
    ];
    const energiesEv = [12.62, 40, 100, 5000];
    const result = bebCrossSections({ orbitals, energiesEv });
    const reference = bebReferenceA2(
      orbitals.flatMap((orbital) => energiesEv.map((energyEv) => ({ ...orbital, energyEv }))),
    );
    orbitals.forEach((_, o) => {
      energiesEv.forEach((energyEv, e) => {
        const expected = reference[o * energiesEv.length + e]!;
        if (expected === 0) expect(result.orbitalA2[o]![e]).toBe(0);
        else {
          const aboveThreshold = energyEv / orbitals[o]!.bindingEv - 1;
          const tolerance = 1e-13 / Math.min(1, aboveThreshold);
          expect(relative(result.orbitalA2[o]![e]!, expected), `${energyEv} eV`).toBeLessThan(tolerance);
        }
      });
    });
  });

  it("refuses a binding energy so small that σ exceeds the double range, naming the orbital", () => {
    // regression: extreme inputs must not print null (σ ≈ 1e325 Å² at B = 5e-324 eV cannot be represented)
    expect(() =>
      bebCrossSections({
        orbitals: [{ label: "tiny", bindingEv: 5e-324, kineticEv: 1, occupation: 2 }],
        energiesEv: [10],
      }),
    ).toThrow(/exceeds the largest representable number \(orbital 1 "tiny", binding energy 5e-324 eV\)/);
  });
});

describe("Maxwellian rates of extreme cross sections and temperatures", () => {
  it("integrates a 1e308 Å² step cross section to σ₀ v̄ (1 + E₀/kT) e^{−E₀/kT}", () => {
    // regression: extreme inputs must not print null (σ·weight summed in Å² overflowed at 1e308 Å²)
    // Closed form of ∫_{x₀}^∞ x e^{−x} dx for a step at E₀ with a constant tail; tolerance 1e-12 relative.
    const e0 = 10;
    const sigmaA2 = 1e308;
    const temperaturesK = [1e4, 1e5, 1e6];
    const result = maxwellianRateCoefficients({
      table: { energiesEv: [e0, 11, 40], crossSectionsA2: [sigmaA2, sigmaA2, sigmaA2] },
      temperaturesK,
      tail: "constant",
    });
    temperaturesK.forEach((t, i) => {
      const x0 = e0 / thermalEv(t);
      const expected = sigmaA2 * 1e-16 * meanSpeed(t) * (1 + x0) * Math.exp(-x0);
      expect(relative(result.rateCm3PerS[i]!, expected), `${t} K`).toBeLessThan(1e-12);
    });
  });

  it("scales linearly with σ up to the largest doubles", () => {
    // k(T) is linear in σ (definition of the Maxwellian average); tolerance 1e-14 relative.
    const energiesEv = [0.5, 1, 3, 8, 20];
    const shape = [0, 0.4, 1.3, 0.9, 0.2];
    const temperaturesK = [3e3, 3e4, 3e5];
    const unit = maxwellianRateCoefficients({
      table: { energiesEv, crossSectionsA2: shape },
      temperaturesK,
    }).rateCm3PerS;
    const huge = maxwellianRateCoefficients({
      table: { energiesEv, crossSectionsA2: shape.map((s) => s * 1e308) },
      temperaturesK,
    }).rateCm3PerS;
    temperaturesK.forEach((t, i) => {
      expect(relative(huge[i]! / 1e308, unit[i]!), `${t} K`).toBeLessThan(1e-14);
    });
  });

  it("gives σ₀ v̄ at temperatures so low that k_B T underflows", () => {
    // regression: extreme inputs must not print null (E/kT was 0/0 at E = 0, and ∫ over an infinite
    // interval formed ∞·0). Closed form ∫₀^∞ x e^{−x} dx = 1 for a constant σ₀; tolerance 1e-12 relative.
    const temperaturesK = [5e-324, 1e-310, 1e-3];
    const result = maxwellianRateCoefficients({
      table: { energiesEv: [0, 1], crossSectionsA2: [2, 2] },
      temperaturesK,
      tail: "constant",
    });
    temperaturesK.forEach((t, i) => {
      expect(relative(result.rateCm3PerS[i]!, 2e-16 * meanSpeed(t)), `${t} K`).toBeLessThan(1e-12);
    });
  });

  it("refuses a rate coefficient beyond the double range with the temperature and units", () => {
    // σ = 1e308 Å² at 1e30 K: k = σ v̄ ≈ 1e292 cm² × 6e20 cm/s, beyond ~1.8e308.
    expect(() =>
      maxwellianRateCoefficients({
        table: { energiesEv: [0, 1], crossSectionsA2: [1e308, 1e308] },
        temperaturesK: [1e30],
        tail: "constant",
      }),
    ).toThrow(/rate coefficient at 1e\+30 K exceeds the largest representable number.*units/);
  });

  it("takes the limits 1, 1, 2 for truncated exponential moments over very long intervals", () => {
    // ∫₀^∞ y^m e^{−y} dy = m! (DLMF 5.2.1); h² overflows at h = 1e200, h = ∞ arises when k_B T underflows.
    for (const h of [1e3, 1e200, Number.POSITIVE_INFINITY]) {
      expect(Array.from(truncatedExponentialMoments(h, new Float64Array(3)))).toEqual([1, 1, 2]);
    }
  });
});

describe("K-matrices with extreme entries", () => {
  const oneState = (kMatrix: number[][], energyEv = 2) => ({
    targetStates: [{ id: "X", spinMultiplicity: 1, energyEv: 0 }],
    symmetries: [
      {
        irrep: "A1",
        totalSpinMultiplicity: 2,
        channels: kMatrix.map((_, l) => ({ targetState: "X", l })),
        points: [{ energyEv, kMatrix }],
      },
    ],
  });

  it("refuses entries of 1e308 with the entry, the symmetry and what to do", () => {
    // regression: extreme inputs must not print null (|1 − iK|² overflowed in the LDLᵀ pivots → NaN)
    const huge = [
      [1e308, 1e308],
      [1e308, 1e308],
    ];
    expect(() => computeKMatrixCrossSections(oneState(huge))).toThrow(
      /^A1 \(2S\+1 = 2\) at 2 eV: K-matrix entry \(0, 0\) is 1e\+308, beyond ±1e100\. .*pole of K.*check the file/,
    );
    expect(() => tMatrixFromKMatrix(huge)).toThrow(ScienceInputError);
  });

  it("gives 4π/k² (δ = π/2) for a single channel with K = 1e99", () => {
    // s-wave σ = (4π/k²) sin²δ with tan δ = 1e99, so sin²δ = 1 to double precision (Mott & Massey, ch. 2);
    // spin weight 2/(2·1) = 1; tolerance 1e-13 relative. A second, uncoupled channel with K = 0.3 adds
    // (4π/k²) sin²(arctan 0.3) = (4π/k²)·0.09/1.09.
    const energyEv = 2;
    const k2 = (2 * energyEv) / HARTREE_EV;
    const single = computeKMatrixCrossSections(oneState([[1e99]], energyEv));
    const expected = ((4 * Math.PI) / k2) * BOHR_ANGSTROM ** 2;
    expect(relative(single.transitions[0]!.crossSectionA2[0]!, expected)).toBeLessThan(1e-13);
    expect(single.symmetries[0]!.eigenphaseSumRad[0]).toBeCloseTo(Math.PI / 2, 14);
    const pair = computeKMatrixCrossSections(
      oneState(
        [
          [1e99, 0],
          [0, 0.3],
        ],
        energyEv,
      ),
    );
    expect(relative(pair.transitions[0]!.crossSectionA2[0]!, expected * (1 + 0.09 / 1.09))).toBeLessThan(
      1e-13,
    );
    expect(eigenphaseSumFromKMatrix([[1e99]])).toBeCloseTo(Math.PI / 2, 14);
  });

  it("refuses an energy so close to threshold that π/k² overflows", () => {
    // regression: extreme inputs must not print null (σ was Infinity at 1e-320 eV above threshold)
    expect(() => computeKMatrixCrossSections(oneState([[1]], 1e-320))).toThrow(
      /only 1e-320 eV above the threshold of target state "X", so π\/k² exceeds the largest representable/,
    );
  });
});
