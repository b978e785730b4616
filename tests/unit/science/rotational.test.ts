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
