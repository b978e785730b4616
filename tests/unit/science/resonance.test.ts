/**
 * Breit–Wigner fits of resonances in eigenphase sums.
 */
import { computeKMatrixCrossSections } from "@shared/science/kmatrix/cross-sections-from-document";
import { breitWignerPhase, fitBreitWignerResonance } from "@shared/science/resonance/breit-wigner-fit";
import { describe, expect, it } from "vitest";
import { seededUniform } from "./support/random-matrices";

const truth = {
  resonanceEnergyEv: 2.1,
  widthEv: 0.15,
  backgroundInterceptRad: 0.3,
  backgroundSlopeRadPerEv: -0.05,
};
const grid = Array.from({ length: 121 }, (_, i) => 0.5 + i * 0.025);

describe("Breit–Wigner resonance fit", () => {
  it("recovers position, width and background from exact synthetic data", () => {
    // Data generated from the model itself (Breit & Wigner 1936 form); tolerance 1e-8 absolute.
    const phases = grid.map((e) => breitWignerPhase(e, truth));
    const fit = fitBreitWignerResonance(grid, phases);
    expect(fit.resonanceEnergyEv).toBeCloseTo(truth.resonanceEnergyEv, 8);
    expect(fit.widthEv).toBeCloseTo(truth.widthEv, 8);
    expect(fit.backgroundInterceptRad).toBeCloseTo(truth.backgroundInterceptRad, 8);
    expect(fit.backgroundSlopeRadPerEv).toBeCloseTo(truth.backgroundSlopeRadPerEv, 8);
    expect(fit.rmsResidualRad).toBeLessThan(1e-9);
  });

  it("stays within the noise when the phases carry ±2 mrad of noise (seed 99)", () => {
    // Uniform noise of half-width 2e-3 rad (rms 1.15e-3): expect E_r within 2 meV, Γ within 3 %.
    const random = seededUniform(99);
    const phases = grid.map((e) => breitWignerPhase(e, truth) + (2 * random() - 1) * 2e-3);
    const fit = fitBreitWignerResonance(grid, phases);
    expect(Math.abs(fit.resonanceEnergyEv - truth.resonanceEnergyEv)).toBeLessThan(2e-3);
    expect(Math.abs(fit.widthEv / truth.widthEv - 1)).toBeLessThan(0.03);
    expect(fit.rmsResidualRad).toBeGreaterThan(0.8e-3);
    expect(fit.rmsResidualRad).toBeLessThan(1.5e-3);
  });

  it("finds the resonance in the eigenphase sum of a two-channel K-matrix", () => {
    // K = R diag(tan δ_res, tan δ_bg) Rᵀ with a fixed rotation R: eigenphase sum = δ_res + δ_bg exactly, so the
    // fit must return the E_r and Γ put into δ_res. Tolerance 1e-6 eV. E_r is kept off the grid: at E = E_r
    // exactly, tan δ_res ≈ 1.6e16 and K could not carry the small eigenvalue in double precision.
    const theta = 0.6;
    const [cs, sn] = [Math.cos(theta), Math.sin(theta)];
    const points = grid.map((energyEv) => {
      const resonant = Math.atan2(0.04, 1.7013 - energyEv);
      const background = 0.1 + 0.02 * energyEv;
      const [l1, l2] = [Math.tan(resonant), Math.tan(background)];
      return {
        energyEv,
        kMatrix: [
          [cs * cs * l1 + sn * sn * l2, cs * sn * (l1 - l2)],
          [cs * sn * (l1 - l2), sn * sn * l1 + cs * cs * l2],
        ],
      };
    });
    const result = computeKMatrixCrossSections(
      {
        targetStates: [{ id: "X", spinMultiplicity: 1, energyEv: 0 }],
        symmetries: [
          {
            irrep: "B1",
            totalSpinMultiplicity: 2,
            channels: [
              { targetState: "X", l: 1, m: 1 },
              { targetState: "X", l: 2, m: 1 },
            ],
            points,
          },
        ],
      },
      { continuousEigenphaseSum: true },
    );
    const fit = fitBreitWignerResonance(result.energiesEv, result.symmetries[0]!.eigenphaseSumRad);
    expect(fit.resonanceEnergyEv).toBeCloseTo(1.7013, 6);
    expect(fit.widthEv).toBeCloseTo(0.08, 6);
    expect(fit.backgroundSlopeRadPerEv).toBeCloseTo(0.02, 6);
  });

  it("reports data without a resonance-like rise", () => {
    const linear = grid.map((e) => 0.2 + 0.05 * e);
    expect(() => fitBreitWignerResonance(grid, linear)).toThrow(/No resonance-like rise/);
    const gentle = grid.map((e) => 0.5 * Math.sin(e / 3));
    expect(() => fitBreitWignerResonance(grid, gentle)).toThrow(/No resonance-like rise/);
  });

  it("rejects too few points and mismatched lengths", () => {
    expect(() => fitBreitWignerResonance([1, 2, 3], [0, 1, 2])).toThrow(/at least 6 points/);
    expect(() => fitBreitWignerResonance([1, 2, 3], [0, 1])).toThrow(/3 energies but 2/);
  });
});
