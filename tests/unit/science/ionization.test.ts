/**
 * Binary-Encounter-Bethe ionization cross sections.
 */
import { ScienceInputError } from "@shared/science/errors";
import { bebCrossSections, bebOrbitalCrossSectionA2 } from "@shared/science/ionization/beb";
import { describe, expect, it } from "vitest";

// H2 orbital constants B = 15.43 eV, U = 15.98 eV, N = 2 (NIST Electron-Impact Cross Section database,
// Kim et al., H2 page; quoted from memory).
const h2 = { bindingEv: 15.43, kineticEv: 15.98, occupation: 2 };

// H2O orbital constants (B, U in eV; N = 2 each) as listed on the NIST Electron-Impact Cross Section
// database H2O page — quoted from memory. They reproduce the database's 100 eV total of 2.348 Å² (below).
const h2o = [
  { label: "1a1", bindingEv: 539.7, kineticEv: 794.5, occupation: 2 },
  { label: "2a1", bindingEv: 36.88, kineticEv: 70.71, occupation: 2 },
  { label: "1b2", bindingEv: 19.83, kineticEv: 48.36, occupation: 2 },
  { label: "3a1", bindingEv: 15.57, kineticEv: 59.52, occupation: 2 },
  { label: "1b1", bindingEv: 12.61, kineticEv: 61.91, occupation: 2 },
];

describe("BEB model (Kim & Rudd, Phys. Rev. A 50, 3954 (1994))", () => {
  it("gives 0.969 Å² for H2 at 100 eV", () => {
    // Source: NIST Electron-Impact Cross Section database, H2 total ionization at 100 eV (0.969 Å², value
    // from memory); tolerance 1 %.
    expect(bebOrbitalCrossSectionA2(h2, 100)).toBeGreaterThan(0.969 * 0.99);
    expect(bebOrbitalCrossSectionA2(h2, 100)).toBeLessThan(0.969 * 1.01);
  });

  it("gives 2.348 Å² for H2O at 100 eV summed over its five orbitals", () => {
    // Source: NIST Electron-Impact Cross Section database, H2O total ionization at 100 eV (2.348 Å², value
    // from memory); tolerance 1 %. The 1a1 core (B ≈ 540 eV) contributes nothing at 100 eV.
    const { totalA2, orbitalA2 } = bebCrossSections({ orbitals: h2o, energiesEv: [100] });
    expect(Math.abs(totalA2[0]! / 2.348 - 1)).toBeLessThan(0.01);
    expect(orbitalA2[0]![0]).toBe(0);
  });

  it("matches a hand evaluation of the formula for H2 at 100 eV", () => {
    // t = 100/15.43 = 6.48088, u = 15.98/15.43 = 1.03564, S = 4π a₀² · 2 · (13.6057/15.43)² = 5.47208 Å²,
    // bracket = 0.91220 + 0.84570 − 0.24982 = 1.50808 → σ = 5.47208 / 8.51652 · 1.50808 = 0.96897 Å²
    // (worked with a calculator; tolerance 1e-4 relative for the 6-digit arithmetic).
    expect(Math.abs(bebOrbitalCrossSectionA2(h2, 100) / 0.96897 - 1)).toBeLessThan(1e-4);
  });

  it("is zero at and below threshold and rises linearly in (T − B) just above it", () => {
    // At t = 1 the bracket vanishes with a finite slope, so σ(B(1 + 2ε))/σ(B(1 + ε)) → 2; tolerance 1e-4.
    expect(bebOrbitalCrossSectionA2(h2, 10)).toBe(0);
    expect(bebOrbitalCrossSectionA2(h2, 15.43)).toBe(0);
    const epsilon = 1e-6;
    const ratio =
      bebOrbitalCrossSectionA2(h2, 15.43 * (1 + 2 * epsilon)) /
      bebOrbitalCrossSectionA2(h2, 15.43 * (1 + epsilon));
    expect(ratio).toBeCloseTo(2, 4);
  });

  it("uses t + (u + 1)/2 as denominator for singly charged ions", () => {
    // Checks the implemented ion variant (Kim, Irikura & Ali 2000, factor quoted from memory): the ratio to the
    // neutral formula is (t + u + 1)/(t + (u + 1)/2) exactly; tolerance 1e-14.
    const t = 100 / h2.bindingEv;
    const u = h2.kineticEv / h2.bindingEv;
    const ratio = bebOrbitalCrossSectionA2(h2, 100, "singly-charged-ion") / bebOrbitalCrossSectionA2(h2, 100);
    expect(ratio).toBeCloseTo((t + u + 1) / (t + (u + 1) / 2), 14);
  });

  it("sums orbitals into the total at every energy and validates the orbitals", () => {
    const energiesEv = [10, 13, 20, 50, 500, 5000];
    const { totalA2, orbitalA2 } = bebCrossSections({ orbitals: h2o, energiesEv });
    energiesEv.forEach((_, e) => {
      expect(totalA2[e]!).toBeCloseTo(
        orbitalA2.reduce((sum, values) => sum + values[e]!, 0),
        14,
      );
    });
    expect(totalA2[0]).toBe(0); // below the lowest binding energy, 12.61 eV
    expect(totalA2[1]!).toBeGreaterThan(0);
    expect(() =>
      bebCrossSections({ orbitals: [{ bindingEv: -1, kineticEv: 1, occupation: 2 }], energiesEv: [10] }),
    ).toThrow(ScienceInputError);
    expect(() => bebCrossSections({ orbitals: [h2], energiesEv: [-5] })).toThrow(/energiesEv/);
  });
});
