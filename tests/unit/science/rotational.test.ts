/**
 * Rotational excitation in the dipole Born approximation.
 */
import { DEBYE_PER_ATOMIC_UNIT, EV_PER_CM1, HARTREE_EV } from "@shared/science/constants";
import {
  dipoleAngularFactor,
  dipoleBornCrossSectionA2,
  dipoleBornCrossSections,
  rotationalLevelEnergyEv,
} from "@shared/science/rotational/dipole-born";
import { describe, expect, it } from "vitest";
import { type DipoleBornCase, dipoleBornReferenceA2 } from "./support/high-precision";

/** a₀ in Å, CODATA 2018 (0.529 177 210 903 Å). */
const BOHR_ANGSTROM = 0.529177210903;

describe("dipole Born rotational cross sections (Itikawa & Mason, Phys. Rep. 414, 1 (2005))", () => {
  it("matches the closed form at k = 1, k' = 1/2 for μ = 1 e·a₀, J = 0 → 1", () => {
    // Choose E = E_h/2 (k = 1 bohr⁻¹) and 2B = 3E_h/8 (k' = 1/2): σ = (8π/3)·1·1·ln((1 + ½)/(1 − ½)) a₀²
    // = (8π/3) ln 3 a₀²; tolerance 1e-12 relative.
    const rotationalConstantCm1 = (0.1875 * HARTREE_EV) / EV_PER_CM1;
    const sigma = dipoleBornCrossSectionA2(
      { dipoleDebye: DEBYE_PER_ATOMIC_UNIT, rotationalConstantCm1, j: 0, jFinal: 1 },
      HARTREE_EV / 2,
    );
    expect(sigma / (((8 * Math.PI) / 3) * Math.log(3) * BOHR_ANGSTROM ** 2)).toBeCloseTo(1, 12);
  });

  it("satisfies detailed balance (2J+1) k² σ(J→J') = (2J'+1) k'² σ(J'→J)", () => {
    // Microscopic reversibility; tolerance 1e-12 relative. Linear molecule and symmetric top (K = 2).
    for (const kProjection of [0, 2]) {
      const molecule = { dipoleDebye: 1.85, rotationalConstantCm1: 9.3, kProjection };
      const j = 3;
      const jFinal = 4;
      const deltaEv = rotationalLevelEnergyEv(jFinal, 9.3) - rotationalLevelEnergyEv(j, 9.3);
      for (const energyEv of [deltaEv * 1.001, 0.05, 1, 30]) {
        const up = dipoleBornCrossSectionA2({ ...molecule, j, jFinal }, energyEv);
        const down = dipoleBornCrossSectionA2({ ...molecule, j: jFinal, jFinal: j }, energyEv - deltaEv);
        const left = (2 * j + 1) * energyEv * up;
        const right = (2 * jFinal + 1) * (energyEv - deltaEv) * down;
        expect(left / right).toBeCloseTo(1, 12);
      }
    }
  });

  it("vanishes at threshold like √(E − ΔE)", () => {
    // Near threshold ln((k+k')/(k−k')) ≈ 2k'/k, so σ ∝ k' ∝ √(E − ΔE): σ(ΔE + 4ε)/σ(ΔE + ε) → 2; tol 1e-4.
    const transition = { dipoleDebye: 3, rotationalConstantCm1: 1.5, j: 1, jFinal: 2 };
    const deltaEv = rotationalLevelEnergyEv(2, 1.5) - rotationalLevelEnergyEv(1, 1.5);
    expect(dipoleBornCrossSectionA2(transition, deltaEv)).toBe(0);
    expect(dipoleBornCrossSectionA2(transition, deltaEv * 0.5)).toBe(0);
    const epsilon = deltaEv * 1e-8;
    const ratio =
      dipoleBornCrossSectionA2(transition, deltaEv + 4 * epsilon) /
      dipoleBornCrossSectionA2(transition, deltaEv + epsilon);
    expect(ratio).toBeCloseTo(2, 4);
  });

  it("uses the angular factors J_>/(2J+1) for linear molecules and [(J+1)² − K²]/[(J+1)(2J+1)] for tops", () => {
    // Hönl–London-type dipole factors (Itikawa & Mason 2005); exact rationals.
    expect(dipoleAngularFactor(0, 1)).toBe(1);
    expect(dipoleAngularFactor(2, 3)).toBeCloseTo(3 / 5, 15);
    expect(dipoleAngularFactor(2, 1)).toBeCloseTo(2 / 5, 15);
    expect(dipoleAngularFactor(1, 2, 1)).toBeCloseTo(3 / 6, 15);
    expect(() => dipoleAngularFactor(1, 3)).toThrow(/J ± 1/);
    expect(() => dipoleAngularFactor(1, 0, 1)).toThrow(/exceeds/);
  });

  it("scales as μ² and validates the request", () => {
    const base = { rotationalConstantCm1: 2, j: 0, energiesEv: [0.01, 0.1] };
    const one = dipoleBornCrossSections({ ...base, dipoleDebye: 1 });
    const three = dipoleBornCrossSections({ ...base, dipoleDebye: 3 });
    expect(three.crossSectionA2[1]! / one.crossSectionA2[1]!).toBeCloseTo(9, 12);
    expect(one.jFinal).toBe(1);
    expect(one.thresholdEv).toBeCloseTo(2 * 2 * EV_PER_CM1, 15);
    expect(() => dipoleBornCrossSections({ ...base, dipoleDebye: 1, jFinal: 2 })).toThrow(/J ± 1 only/);
    expect(() => dipoleBornCrossSections({ ...base, dipoleDebye: 1, energiesEv: [0] })).toThrow(/> 0 eV/);
  });
});

describe("dipole Born cross sections far from the usual energies", () => {
  // OH-like rotor (μ = 1.67 D, B = 18.5 cm⁻¹) and a symmetric top (μ = 1.47 D, B = 9.44 cm⁻¹, K = 2).
  const oh = { dipoleDebye: 1.67, rotationalConstantCm1: 18.5 };
  const top = { dipoleDebye: 1.47, rotationalConstantCm1: 9.44, kProjection: 2 };
  const relative = (value: number, expected: number) => Math.abs(value / expected - 1);

  it("keeps full precision for de-excitation at tiny energies, against a 400-digit evaluation", () => {
    // regression: dipole Born de-excitation must keep its precision as E → 0 (ln((k + k')²/|k² − k'²|)
    // rounded towards ln 1 once k ≪ k', losing digits from ~1e-20 eV and the sign by 1e-40 eV)
    // Reference: the Itikawa & Mason formula evaluated as written with mpmath at 400 digits and CODATA 2018
    // constants (support/high-precision.py); tolerance 1e-13 relative.
    const energiesEv = [1e-300, 1e-40, 1e-30, 1e-20, 1e-10, 1e-3, 0.1, 10, 1e4];
    const cases: DipoleBornCase[] = [
      ...energiesEv.map((energyEv) => ({ ...oh, j: 1, jFinal: 0, energyEv })),
      ...energiesEv.map((energyEv) => ({ ...top, j: 5, jFinal: 4, energyEv })),
    ];
    const reference = dipoleBornReferenceA2(cases);
    cases.forEach((c, i) => {
      const sigma = dipoleBornCrossSectionA2(c, c.energyEv);
      expect(relative(sigma, reference[i]!), `J=${c.j}→${c.jFinal} at ${c.energyEv} eV`).toBeLessThan(1e-13);
    });
  });

  it("keeps full precision for excitation from just above threshold to far above it", () => {
    // Same 400-digit reference; tolerance 1e-13 relative, loosened by ΔE/(E − ΔE) just above threshold,
    // where E − ΔE itself carries the rounding of E.
    const deltaEv = rotationalLevelEnergyEv(3, oh.rotationalConstantCm1) - rotationalLevelEnergyEv(2, 18.5);
    const energiesEv = [deltaEv * (1 + 1e-9), deltaEv * 1.001, deltaEv * 2, 1, 1e3, 1e8];
    const cases: DipoleBornCase[] = energiesEv.map((energyEv) => ({ ...oh, j: 2, jFinal: 3, energyEv }));
    const reference = dipoleBornReferenceA2(cases);
    cases.forEach((c, i) => {
      const tolerance = 1e-13 * Math.max(1, deltaEv / (c.energyEv - deltaEv));
      expect(
        relative(dipoleBornCrossSectionA2(c, c.energyEv), reference[i]!),
        `${c.energyEv} eV`,
      ).toBeLessThan(tolerance);
    });
  });

  it("follows the zero-energy series σ → (16π/3) μ² F / (k k') for de-excitation", () => {
    // ln((1 + x)/(1 − x)) = 2x + 2x³/3 + … with x = k/k' (series of 2 artanh x, Abramowitz & Stegun
    // 4.6.22), so σ = (8π/3)(μ²/k²) F · 2k/k' · (1 + x²/3 + …); at these energies x² < 1e-19, far below
    // the tolerance of 1e-14 relative. Constants typed from CODATA 2018: E_h = 27.211 386 245 988 eV,
    // e·a₀ = 8.478 353 6255e-30 C·m, 1 D = 1e-21/c C·m, hc = 1.239 841 984…e-4 eV·cm (h, c, e exact).
    const hartreeEv = 27.211386245988;
    const muAtomic = (1.67 * (1e-21 / 299792458)) / 8.4783536255e-30;
    const evPerCm1 = (6.62607015e-34 * 299792458 * 100) / 1.602176634e-19;
    const deltaEv = 2 * oh.rotationalConstantCm1 * evPerCm1;
    const factor = 1 / 3; // F(1 → 0) = J_>/(2J + 1) = 1/3
    for (const energyEv of [5e-324, 1e-300, 1e-100, 1e-40, 1e-21]) {
      const k = Math.sqrt(energyEv) * Math.sqrt(2 / hartreeEv);
      const kFinal = Math.sqrt((2 * (energyEv + deltaEv)) / hartreeEv);
      const series =
        ((16 * Math.PI) / 3) * ((muAtomic * muAtomic) / (k * kFinal)) * factor * BOHR_ANGSTROM ** 2;
      const sigma = dipoleBornCrossSectionA2({ ...oh, j: 1, jFinal: 0 }, energyEv);
      expect(relative(sigma, series), `${energyEv} eV`).toBeLessThan(1e-14);
    }
  });

  it("refuses a cross section beyond the double range instead of returning Infinity", () => {
    // regression: extreme inputs must not print null (B = 1e-300 cm⁻¹ with E = 1e-320 eV gives σ ≈ 1e323 Å²)
    expect(() =>
      dipoleBornCrossSections({
        dipoleDebye: 1.67,
        rotationalConstantCm1: 1e-300,
        j: 1,
        jFinal: 0,
        energiesEv: [1e-320],
      }),
    ).toThrow(
      /at 1e-320 eV lies beyond the range of double-precision numbers \(dipole 1.67 D, rotational constant 1e-300 cm⁻¹\)/,
    );
  });
});
