/**
 * State-to-state integral cross sections and eigenphase sums from K-matrices given per irreducible
 * representation (irrep), total spin and energy.
 *
 * For electron + target state i (spin multiplicity M_i = 2S_i + 1, spatial degeneracy g_i) the cross section
 * summed over all symmetries Γ and total spin multiplicities M = 2S + 1 is
 *
 *   σ(i → j) = (π / k_i²) Σ_{Γ,M} [M / (2 M_i g_i)] Σ_{a ∈ i, b ∈ j} |T^{ΓM}_ab|²,
 *
 * with T = 2iK(1 − iK)⁻¹ (see t-matrix.ts), a and b running over the open channels of states i and j, and
 * k_i² = 2(E − E_i)/E_h in bohr⁻² (hartree atomic units, electron mass). M/(2M_i) is the spin-statistical
 * weight of total spin S among the 2(2S_i + 1) spin states of electron + target.
 * Reference: e.g. P. G. Burke, R-Matrix Theory of Atomic Collisions (Springer, 2011) (cross sections from
 * the T-matrix, spin averaging); N. F. Mott and H. S. W. Massey, The Theory of Atomic Collisions (1965).
 *
 * The channel setup (states, spin weights, grid) is checked in ./channel-setup.ts; whole input documents
 * are read in ./cross-sections-from-document.ts.
 *
 * Open and closed channels: a channel is open at total energy E when E > E_i of its target state. The
 * K-matrix of a point must be over exactly the open channels, in the order of the symmetry's channel list;
 * closed channels are left out. σ(i → j) is reported as 0 where state i or j is closed.
 *
 * Performance: one O(n³) complex LDLᵀ inversion per (symmetry, energy); every buffer is allocated once by
 * the accumulator, so feeding points allocates nothing.
 */
import type { TargetState } from "../../schemas/science-scattering";
import { ANGSTROM2_PER_BOHR2, HARTREE_EV } from "../constants";
import { ScienceInputError } from "../errors";
import { ComplexSymmetricWorkspace } from "../linear-algebra/complex-symmetric-inverse";
import {
  type KMatrixCrossSectionSetup,
  type KMatrixSymmetrySetup,
  type PreparedSymmetry,
  prepareChannelSetup,
} from "./channel-setup";
import { unwrapPhases } from "./eigenphase-continuity";
import { assertSymmetricKMatrix, invertOneMinusIK, KMATRIX_SYMMETRY_TOLERANCE } from "./t-matrix";

export type { KMatrixCrossSectionSetup, KMatrixSymmetrySetup } from "./channel-setup";

export interface KMatrixCrossSectionResult {
  energiesEv: Float64Array;
  symmetries: { irrep: string; totalSpinMultiplicity: number; eigenphaseSumRad: Float64Array }[];
  /** Every ordered pair of target states that appear in some channel. */
  transitions: { fromState: string; toState: string; crossSectionA2: Float64Array }[];
}

/**
 * Accumulates σ(i → j) and eigenphase sums point by point, so that K-matrices can be produced and dropped
 * one at a time (a 100-channel, 10 000-energy series would not fit in memory at once).
 */
export class KMatrixCrossSectionAccumulator {
  private readonly states: readonly TargetState[];
  private readonly thresholdsEv: Float64Array;
  private readonly energiesEv: Float64Array;
  private readonly symmetries: PreparedSymmetry[];
  private readonly setupSymmetries: readonly KMatrixSymmetrySetup[];
  private readonly sigmaBohr2: Float64Array;
  private readonly eigenphaseSums: Float64Array[];
  private readonly filled: Uint8Array[];
  private readonly workspace: ComplexSymmetricWorkspace;
  private readonly openChannels: Int32Array;
  private readonly openCoefficient: Float64Array;
  private readonly stateUsed: Uint8Array;
  private readonly symmetryTolerance: number;

  /**
   * @param setup - target states, channel lists and the energy grid
   * @param options.symmetryTolerance - relative tolerance of the K-matrix symmetry check
   * @throws ScienceInputError for unknown or duplicate states, inconsistent spins, duplicate symmetries or a
   *   grid that is not strictly increasing
   */
  constructor(setup: KMatrixCrossSectionSetup, options: { symmetryTolerance?: number } = {}) {
    this.symmetryTolerance = options.symmetryTolerance ?? KMATRIX_SYMMETRY_TOLERANCE;
    this.states = setup.targetStates;
    this.setupSymmetries = setup.symmetries;
    const prepared = prepareChannelSetup(setup);
    this.thresholdsEv = prepared.thresholdsEv;
    this.energiesEv = prepared.energiesEv;
    this.symmetries = prepared.symmetries;
    this.stateUsed = prepared.stateUsed;
    const nStates = this.states.length;
    const nEnergies = this.energiesEv.length;
    const capacity = prepared.maxChannelCount;
    this.sigmaBohr2 = new Float64Array(nEnergies * nStates * nStates);
    this.eigenphaseSums = this.symmetries.map(() => new Float64Array(nEnergies));
    this.filled = this.symmetries.map(() => new Uint8Array(nEnergies));
    this.workspace = new ComplexSymmetricWorkspace(capacity);
    this.openChannels = new Int32Array(capacity);
    this.openCoefficient = new Float64Array(capacity);
  }

  /**
   * Number of channels of a symmetry open at a grid energy, i.e. the order its K-matrix must have.
   *
   * @param symmetryIndex - index into `setup.symmetries`
   * @param energyIndex - index into the energy grid
   */
  openChannelCount(symmetryIndex: number, energyIndex: number): number {
    const symmetry = this.symmetryAt(symmetryIndex);
    const energyEv = this.energyAt(energyIndex);
    let count = 0;
    for (let c = 0; c < symmetry.channelState.length; c++) {
      if (energyEv > this.thresholdsEv[symmetry.channelState[c]!]!) count++;
    }
    return count;
  }

  private symmetryAt(index: number): PreparedSymmetry {
    const symmetry = this.symmetries[index];
    if (!symmetry) throw new RangeError(`Symmetry index ${index} is out of range.`);
    return symmetry;
  }

  private energyAt(index: number): number {
    const energy = this.energiesEv[index];
    if (energy === undefined) throw new RangeError(`Energy index ${index} is out of range.`);
    return energy;
  }

  /**
   * Adds the K-matrix of one symmetry at one grid energy.
   *
   * @param symmetryIndex - index into `setup.symmetries`
   * @param energyIndex - index into the energy grid
   * @param kMatrix - row-major n×n K over the open channels (n = {@link openChannelCount}), symmetric
   * @throws ScienceInputError for a wrong size, a non-symmetric or non-finite K, or a point given twice
   */
  addPoint(symmetryIndex: number, energyIndex: number, kMatrix: ArrayLike<number>): void {
    const symmetry = this.symmetryAt(symmetryIndex);
    const energyEv = this.energyAt(energyIndex);
    const context = `${symmetry.label} at ${energyEv} eV`;
    const filled = this.filled[symmetryIndex]!;
    if (filled[energyIndex]) throw new ScienceInputError(`${context}: K-matrix given twice.`);

    const open = this.openChannels;
    const coefficient = this.openCoefficient;
    let n = 0;
    for (let c = 0; c < symmetry.channelState.length; c++) {
      const state = symmetry.channelState[c]!;
      const aboveThresholdEv = energyEv - this.thresholdsEv[state]!;
      if (aboveThresholdEv > 0) {
        open[n] = c;
        // |T|² = 4|X − 1|², k² = 2(E − E_i)/E_h.
        coefficient[n] = 4 * Math.PI * symmetry.weightByState[state]! * (HARTREE_EV / 2 / aboveThresholdEv);
        if (!Number.isFinite(coefficient[n]!)) {
          throw new ScienceInputError(
            `${context}: the energy is only ${aboveThresholdEv} eV above the threshold of target state ` +
              `"${this.states[state]!.id}", so π/k² exceeds the largest representable number. Leave out ` +
              "energies this close to a threshold (or check the state energies' units).",
            { aboveThresholdEv },
          );
        }
        n++;
      }
    }
    if (kMatrix.length !== n * n) {
      throw new ScienceInputError(
        `${context}: ${n} channel${n === 1 ? " is" : "s are"} open, so the K-matrix must be ${n}×${n} ` +
          `(${n * n} values); got ${kMatrix.length} values. Closed channels must be left out.`,
        { openChannels: n },
      );
    }
    filled[energyIndex] = 1;
    if (n === 0) {
      this.eigenphaseSums[symmetryIndex]![energyIndex] = 0;
      return;
    }
    assertSymmetricKMatrix(kMatrix, n, context, this.symmetryTolerance);
    const argDeterminant = invertOneMinusIK(kMatrix, n, this.workspace);
    if (!Number.isFinite(argDeterminant)) {
      throw new ScienceInputError(
        `${context}: inverting 1 − iK overflowed the double range; check the K-matrix for extreme entries.`,
      );
    }
    this.eigenphaseSums[symmetryIndex]![energyIndex] = -argDeterminant;

    const nStates = this.states.length;
    const base = energyIndex * nStates * nStates;
    const sigma = this.sigmaBohr2;
    const xr = this.workspace.inverseReal;
    const xi = this.workspace.inverseImag;
    const channelState = symmetry.channelState;
    for (let a = 0; a < n; a++) {
      const stateA = channelState[open[a]!]!;
      const coefficientA = coefficient[a]!;
      const row = a * n;
      for (let b = 0; b < a; b++) {
        const re = xr[row + b]!;
        const im = xi[row + b]!;
        const modulus2 = re * re + im * im;
        const stateB = channelState[open[b]!]!;
        sigma[base + stateA * nStates + stateB]! += coefficientA * modulus2;
        sigma[base + stateB * nStates + stateA]! += coefficient[b]! * modulus2;
      }
      const re = xr[row + a]! - 1;
      const im = xi[row + a]!;
      sigma[base + stateA * nStates + stateA]! += coefficientA * (re * re + im * im);
    }
  }

  /**
   * Collects the result once every (symmetry, energy) point has been added.
   *
   * @param options.continuousEigenphaseSum - remove π jumps of each eigenphase sum along the energy grid
   *   ({@link unwrapPhases}); otherwise each sum is Σ arctan λ_k ∈ (−nπ/2, nπ/2) as computed
   * @returns energies, eigenphase sums per symmetry (rad) and σ(i → j) in Å²
   * @throws ScienceInputError naming the first missing point, or the first σ beyond the double range
   */
  result(options: { continuousEigenphaseSum?: boolean } = {}): KMatrixCrossSectionResult {
    this.filled.forEach((flags, s) => {
      const missing = flags.indexOf(0);
      if (missing >= 0) {
        throw new ScienceInputError(
          `${this.symmetries[s]!.label}: no K-matrix at ${this.energiesEv[missing]} eV (every symmetry needs ` +
            "every energy of the grid).",
        );
      }
    });
    const nStates = this.states.length;
    const nEnergies = this.energiesEv.length;
    const transitions: KMatrixCrossSectionResult["transitions"] = [];
    for (let i = 0; i < nStates; i++) {
      if (!this.stateUsed[i]) continue;
      for (let j = 0; j < nStates; j++) {
        if (!this.stateUsed[j]) continue;
        const crossSectionA2 = new Float64Array(nEnergies);
        for (let e = 0; e < nEnergies; e++) {
          crossSectionA2[e] = this.sigmaBohr2[e * nStates * nStates + i * nStates + j]! * ANGSTROM2_PER_BOHR2;
          if (!Number.isFinite(crossSectionA2[e]!)) {
            throw new ScienceInputError(
              `σ(${this.states[i]!.id} → ${this.states[j]!.id}) at ${this.energiesEv[e]} eV exceeds the largest ` +
                "representable number (π/k² diverges at threshold): leave out energies this close to the " +
                `threshold of "${this.states[i]!.id}" (or check the state energies' units).`,
              { energyEv: this.energiesEv[e], fromState: this.states[i]!.id, toState: this.states[j]!.id },
            );
          }
        }
        transitions.push({ fromState: this.states[i]!.id, toState: this.states[j]!.id, crossSectionA2 });
      }
    }
    return {
      energiesEv: Float64Array.from(this.energiesEv),
      symmetries: this.setupSymmetries.map((symmetry, s) => ({
        irrep: symmetry.irrep,
        totalSpinMultiplicity: symmetry.totalSpinMultiplicity,
        eigenphaseSumRad: options.continuousEigenphaseSum
          ? unwrapPhases(this.eigenphaseSums[s]!)
          : Float64Array.from(this.eigenphaseSums[s]!),
      })),
      transitions,
    };
  }
}
