/**
 * K-matrix → T, S, eigenphases and state-to-state cross sections.
 * Convention under test: S = (1 + iK)(1 − iK)⁻¹, T = S − 1.
 */
import type { KMatrixInputDocument } from "@shared/schemas/science-scattering";
import { ANGSTROM2_PER_BOHR2, HARTREE_EV } from "@shared/science/constants";
import { ScienceInputError } from "@shared/science/errors";
import { KMatrixCrossSectionAccumulator } from "@shared/science/kmatrix/cross-sections";
import { computeKMatrixCrossSections } from "@shared/science/kmatrix/cross-sections-from-document";
import {
  eigenphaseSumFromKMatrix,
  eigenphasesFromKMatrix,
  sMatrixFromKMatrix,
  tMatrixFromKMatrix,
} from "@shared/science/kmatrix/t-matrix";
import { invertMatrix } from "@shared/science/linear-algebra/lu";
import { describe, expect, it } from "vitest";
import { randomSymmetricMatrix } from "./support/random-matrices";

/** k² in bohr⁻² for an electron energy in eV (hartree units, E = k²/2). */
const k2 = (energyEv: number) => (2 * energyEv) / HARTREE_EV;

describe("T and S from K", () => {
  it("gives T = e^{2iδ} − 1 for one channel with K = tan δ", () => {
    // Single-channel closed form: S = (1 + i tan δ)/(1 − i tan δ) = e^{2iδ}; tolerance 1e-14.
    for (const delta of [-1.2, -0.3, 0.01, 0.7, 1.5]) {
      const t = tMatrixFromKMatrix([[Math.tan(delta)]]);
      expect(t.real[0]![0]!).toBeCloseTo(Math.cos(2 * delta) - 1, 14);
      expect(t.imag[0]![0]!).toBeCloseTo(Math.sin(2 * delta), 14);
    }
  });

  it("keeps S unitary and symmetric for random symmetric K, also with large entries (seeds 7, 8)", () => {
    // Unitarity S†S = 1 follows from K = Kᵀ real (flux conservation); tolerance 1e-12.
    for (const [seed, scale] of [
      [7, 1],
      [8, 50],
    ] as const) {
      const n = 12;
      const s = sMatrixFromKMatrix(randomSymmetricMatrix(n, seed, scale));
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          let re = 0;
          let im = 0;
          for (let m = 0; m < n; m++) {
            // (S†S)_ij = Σ_m conj(S_mi) S_mj
            re += s.real[m]![i]! * s.real[m]![j]! + s.imag[m]![i]! * s.imag[m]![j]!;
            im += s.real[m]![i]! * s.imag[m]![j]! - s.imag[m]![i]! * s.real[m]![j]!;
          }
          expect(Math.abs(re - (i === j ? 1 : 0))).toBeLessThan(1e-12);
          expect(Math.abs(im)).toBeLessThan(1e-12);
          expect(s.real[i]![j]!).toBeCloseTo(s.real[j]![i]!, 13);
        }
      }
    }
  });

  it("agrees with the real-arithmetic form Re T = −2K²(1+K²)⁻¹, Im T = 2K(1+K²)⁻¹ (seed 21)", () => {
    // Independent route: real LU inverse of 1 + K²; tolerance 1e-12.
    const n = 8;
    const kRows = randomSymmetricMatrix(n, 21, 2);
    const k = kRows.flat();
    const kk = Array.from({ length: n * n }, (_, index) => {
      const i = Math.floor(index / n);
      const j = index % n;
      let sum = 0;
      for (let m = 0; m < n; m++) sum += k[i * n + m]! * k[m * n + j]!;
      return sum;
    });
    const a = invertMatrix(
      Array.from({ length: n }, (_, i) =>
        Array.from({ length: n }, (_, j) => kk[i * n + j]! + (i === j ? 1 : 0)),
      ),
    );
    const t = tMatrixFromKMatrix(kRows);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let re = 0;
        let im = 0;
        for (let m = 0; m < n; m++) {
          re += -2 * kk[i * n + m]! * a[m * n + j]!;
          im += 2 * k[i * n + m]! * a[m * n + j]!;
        }
        expect(Math.abs(t.real[i]![j]! - re)).toBeLessThan(1e-12);
        expect(Math.abs(t.imag[i]![j]! - im)).toBeLessThan(1e-12);
      }
    }
  });

  it("returns eigenphases whose S eigenvalues give tr S = Σ e^{2iδ} and whose sum matches the pivot phases", () => {
    // tr S is basis independent: S = V diag(e^{2iδ}) Vᵀ with V real orthogonal; tolerance 1e-12.
    const kRows = randomSymmetricMatrix(10, 31, 4);
    const delta = eigenphasesFromKMatrix(kRows);
    const s = sMatrixFromKMatrix(kRows);
    const traceRe = s.real.reduce((sum, row, i) => sum + row[i]!, 0);
    const traceIm = s.imag.reduce((sum, row, i) => sum + row[i]!, 0);
    expect(traceRe).toBeCloseTo(
      delta.reduce((sum, d) => sum + Math.cos(2 * d), 0),
      12,
    );
    expect(traceIm).toBeCloseTo(
      delta.reduce((sum, d) => sum + Math.sin(2 * d), 0),
      12,
    );
    expect(eigenphaseSumFromKMatrix(kRows)).toBeCloseTo(
      delta.reduce((sum, d) => sum + d, 0),
      12,
    );
  });

  it("rejects a non-symmetric K-matrix with the size of the defect", () => {
    expect(() =>
      tMatrixFromKMatrix([
        [0.1, 0.2],
        [0.3, 0.4],
      ]),
    ).toThrow(/not symmetric/);
  });
});

describe("state-to-state cross sections", () => {
  const singleChannel = (deltas: number[], energies: number[]): KMatrixInputDocument => ({
    targetStates: [{ id: "X", spinMultiplicity: 1, energyEv: 0 }],
    symmetries: [
      {
        irrep: "A1",
        totalSpinMultiplicity: 2,
        channels: [{ targetState: "X", l: 0 }],
        points: energies.map((energyEv, e) => ({ energyEv, kMatrix: [[Math.tan(deltas[e]!)]] })),
      },
    ],
  });

  it("reduces to the s-wave result 4π sin²δ / k² for one channel of a singlet target", () => {
    // Source: σ_0 = (4π/k²) sin²δ_0 (Mott & Massey, ch. 2); spin weight 2/(2·1) = 1; tolerance 1e-12 rel.
    const energies = [0.5, 1, 4];
    const deltas = [0.4, -1.1, 2.0];
    const result = computeKMatrixCrossSections(singleChannel(deltas, energies));
    const elastic = result.transitions.find((t) => t.fromState === "X" && t.toState === "X")!;
    energies.forEach((energy, e) => {
      const expected = ((4 * Math.PI) / k2(energy)) * Math.sin(deltas[e]!) ** 2 * ANGSTROM2_PER_BOHR2;
      expect(elastic.crossSectionA2[e]! / expected).toBeCloseTo(1, 12);
    });
  });

  it("sums spin components with weights (2S+1)/(2(2S_i+1)) that add up to one", () => {
    // Doublet target: total singlet weight 1/4, triplet 3/4. Identical K in both → the one-channel result.
    const delta = 0.8;
    const energyEv = 2;
    const result = computeKMatrixCrossSections({
      targetStates: [{ id: "D", spinMultiplicity: 2, energyEv: 0 }],
      symmetries: [1, 3].map((multiplicity) => ({
        irrep: "Ag",
        totalSpinMultiplicity: multiplicity,
        channels: [{ targetState: "D", l: 0 }],
        points: [{ energyEv, kMatrix: [[Math.tan(delta)]] }],
      })),
    });
    const expected = ((4 * Math.PI) / k2(energyEv)) * Math.sin(delta) ** 2 * ANGSTROM2_PER_BOHR2;
    expect(result.transitions[0]!.crossSectionA2[0]! / expected).toBeCloseTo(1, 12);
  });

  // Two target states: X (singlet, 0 eV) and T (triplet, 1.5 eV). Doublet symmetry couples X and T (2×2 K
  // above 1.5 eV, 1×1 below); the quartet symmetry holds the T channel only.
  const a = 0.3;
  const b = 0.45;
  const c = -0.7;
  const quartetK = 0.25;
  const energies = [1, 2, 3.5];
  const twoState: KMatrixInputDocument = {
    targetStates: [
      { id: "X", label: "ground", spinMultiplicity: 1, energyEv: 0 },
      { id: "T", label: "excited", spinMultiplicity: 3, energyEv: 1.5 },
    ],
    symmetries: [
      {
        irrep: "A1",
        totalSpinMultiplicity: 2,
        channels: [
          { targetState: "X", l: 0 },
          { targetState: "T", l: 0 },
        ],
        points: energies.map((energyEv) => ({
          energyEv,
          kMatrix:
            energyEv > 1.5
              ? [
                  [a, b],
                  [b, c],
                ]
              : [[a]],
        })),
      },
      {
        irrep: "A1",
        totalSpinMultiplicity: 4,
        channels: [{ targetState: "T", l: 0 }],
        points: energies.map((energyEv) => ({ energyEv, kMatrix: energyEv > 1.5 ? [[quartetK]] : [] })),
      },
    ],
  };

  it("matches the 2×2 closed form |T₁₂|² = 4b² / [(1 − ac + b²)² + (a + c)²] and is 0 below threshold", () => {
    // Closed form from X = (1 − iK)⁻¹ = adj(1 − iK)/det for K = [[a, b], [b, c]]; tolerance 1e-12 rel.
    const result = computeKMatrixCrossSections(twoState);
    const excitation = result.transitions.find((t) => t.fromState === "X" && t.toState === "T")!;
    const t12Squared = (4 * b * b) / ((1 - a * c + b * b) ** 2 + (a + c) ** 2);
    expect(excitation.crossSectionA2[0]).toBe(0);
    for (const e of [1, 2]) {
      // Spin weight of the doublet for the singlet ground state: 2/(2·1) = 1.
      const expected = (Math.PI / k2(energies[e]!)) * t12Squared * ANGSTROM2_PER_BOHR2;
      expect(excitation.crossSectionA2[e]! / expected).toBeCloseTo(1, 12);
    }
  });

  it("obeys detailed balance g_i k_i² σ(i→j) = g_j k_j² σ(j→i) with g = 2S+1", () => {
    // Microscopic reversibility (|T_ij| = |T_ji|); tolerance 1e-12 rel.
    const result = computeKMatrixCrossSections(twoState);
    const up = result.transitions.find((t) => t.fromState === "X" && t.toState === "T")!;
    const down = result.transitions.find((t) => t.fromState === "T" && t.toState === "X")!;
    for (const e of [1, 2]) {
      const left = 1 * k2(energies[e]!) * up.crossSectionA2[e]!;
      const right = 3 * k2(energies[e]! - 1.5) * down.crossSectionA2[e]!;
      expect(left / right).toBeCloseTo(1, 12);
    }
  });

  it("adds the quartet contribution with weight 4/6 to the excited-state elastic cross section", () => {
    // σ(T→T) = (π/k_T²)[(2/6)|T₂₂(doublet)|² + (4/6)|T(quartet)|²]; the doublet T₂₂ from the 2×2 closed form
    // T₂₂ = 2X₂₂ − 2, X₂₂ = (1 − ia)/det; tolerance 1e-12 rel.
    const result = computeKMatrixCrossSections(twoState);
    const elastic = result.transitions.find((t) => t.fromState === "T" && t.toState === "T")!;
    const detRe = 1 - a * c + b * b;
    const detIm = -(a + c);
    const det2 = detRe ** 2 + detIm ** 2;
    // X₂₂ = (1 − ia)/(detRe + i detIm)
    const x22Re = (1 * detRe + -a * detIm) / det2;
    const x22Im = (-a * detRe - 1 * detIm) / det2;
    const doublet = 4 * ((x22Re - 1) ** 2 + x22Im ** 2);
    const quartet = 4 * Math.sin(Math.atan(quartetK)) ** 2;
    const e = 2;
    const expected = (Math.PI / k2(energies[e]! - 1.5)) * ((2 / 6) * doublet + (4 / 6) * quartet);
    expect(elastic.crossSectionA2[e]! / (expected * ANGSTROM2_PER_BOHR2)).toBeCloseTo(1, 12);
  });

  it("removes π jumps from the eigenphase sum when asked", () => {
    // δ(E) rises through π/2 (K = tan δ passes through ±∞): raw arctan jumps by −π; unwrapped equals δ.
    const energiesEv = Array.from({ length: 41 }, (_, i) => 1 + i * 0.05);
    const deltas = energiesEv.map((e) => 0.2 + Math.atan2(0.05, 2 - e));
    const raw = computeKMatrixCrossSections(singleChannel(deltas, energiesEv));
    const smooth = computeKMatrixCrossSections(singleChannel(deltas, energiesEv), {
      continuousEigenphaseSum: true,
    });
    const rawSeries = raw.symmetries[0]!.eigenphaseSumRad;
    expect(Math.max(...rawSeries)).toBeLessThan(Math.PI / 2);
    smooth.symmetries[0]!.eigenphaseSumRad.forEach((value, i) => {
      expect(value).toBeCloseTo(deltas[i]!, 12);
    });
  });

  it("explains a K-matrix that still contains a closed channel", () => {
    const broken = structuredClone(twoState);
    broken.symmetries[0]!.points[0]!.kMatrix = [
      [a, b],
      [b, c],
    ];
    expect(() => computeKMatrixCrossSections(broken)).toThrow(
      /1 channel is open, so the K-matrix must be 1×1/,
    );
  });

  it("rejects a total spin that the target state cannot reach", () => {
    const broken = structuredClone(twoState);
    broken.symmetries[1]!.channels = [{ targetState: "X", l: 0 }];
    expect(() => computeKMatrixCrossSections(broken)).toThrow(/cannot give total 2S\+1 = 4/);
  });

  it("rejects symmetries on different energy grids and unknown target states", () => {
    const shifted = structuredClone(twoState);
    shifted.symmetries[1]!.points[2]!.energyEv = 3.6;
    expect(() => computeKMatrixCrossSections(shifted)).toThrow(/share one energy grid/);
    const unknown = structuredClone(twoState);
    unknown.symmetries[0]!.channels[1]!.targetState = "Q";
    expect(() => computeKMatrixCrossSections(unknown)).toThrow(/unknown target state "Q"/);
    expect(() => computeKMatrixCrossSections({ targetStates: [] })).toThrow(ScienceInputError);
  });

  it("accumulates row-major points one at a time and refuses a point given twice", () => {
    const accumulator = new KMatrixCrossSectionAccumulator({
      targetStates: [{ id: "X", spinMultiplicity: 1, energyEv: 0, degeneracy: 1 }],
      symmetries: [{ irrep: "A1", totalSpinMultiplicity: 2, channels: [{ targetState: "X", l: 0 }] }],
      energiesEv: [1, 2],
    });
    accumulator.addPoint(0, 0, [0.5]);
    expect(() => accumulator.addPoint(0, 0, [0.5])).toThrow(/given twice/);
    expect(() => accumulator.result()).toThrow(/no K-matrix at 2 eV/);
    accumulator.addPoint(0, 1, [0.5]);
    const sigma = accumulator.result().transitions[0]!.crossSectionA2;
    // Same K at both energies: σ ∝ 1/k², so σ(1 eV)/σ(2 eV) = 2.
    expect(sigma[0]! / sigma[1]!).toBeCloseTo(2, 12);
  });
});
