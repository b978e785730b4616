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
 * Open and closed channels: a channel is open at total energy E when E > E_i of its target state. The
 * K-matrix of a point must be over exactly the open channels, in the order of the symmetry's channel list;
 * closed channels are left out. σ(i → j) is reported as 0 where state i or j is closed.
 *
 * Performance: one O(n³) complex LDLᵀ inversion per (symmetry, energy); every buffer is allocated once by
 * the accumulator, so feeding points allocates nothing.
 */
import {
  type KMatrixInput,
  kMatrixInputSchema,
  parseScienceInput,
  type ScatteringChannel,
  type TargetState,
} from "../../schemas/science-scattering";
import { ANGSTROM2_PER_BOHR2, HARTREE_EV } from "../constants";
import { ScienceInputError } from "../errors";
import { ComplexSymmetricWorkspace } from "../linear-algebra/complex-symmetric-inverse";
import { unwrapPhases } from "./eigenphase-continuity";
import { assertSymmetricKMatrix, invertOneMinusIK, KMATRIX_SYMMETRY_TOLERANCE } from "./t-matrix";

/** Channels of one irrep and total spin, without the K-matrices. */
export interface KMatrixSymmetrySetup {
  irrep: string;
  totalSpinMultiplicity: number;
  channels: readonly ScatteringChannel[];
}

/** Everything the accumulator needs before K-matrices arrive. */
export interface KMatrixCrossSectionSetup {
  targetStates: readonly TargetState[];
  symmetries: readonly KMatrixSymmetrySetup[];
  /** The common energy grid in eV, strictly increasing. */
  energiesEv: ArrayLike<number>;
}

export interface KMatrixCrossSectionResult {
  energiesEv: Float64Array;
  symmetries: { irrep: string; totalSpinMultiplicity: number; eigenphaseSumRad: Float64Array }[];
  /** Every ordered pair of target states that appear in some channel. */
  transitions: { fromState: string; toState: string; crossSectionA2: Float64Array }[];
}

interface PreparedSymmetry {
  label: string;
  channelState: Int32Array;
  /** M / (2 M_i g_i) per target state index (0 where the state has no channel here). */
  weightByState: Float64Array;
}

function symmetryLabel(irrep: string, multiplicity: number): string {
  return `${irrep} (2S+1 = ${multiplicity})`;
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
    const stateIndex = new Map<string, number>();
    setup.targetStates.forEach((state, index) => {
      if (stateIndex.has(state.id)) throw new ScienceInputError(`Target state id "${state.id}" is repeated.`);
      stateIndex.set(state.id, index);
    });
    const nStates = setup.targetStates.length;
    this.thresholdsEv = Float64Array.from(setup.targetStates, (state) => state.energyEv);

    this.energiesEv = Float64Array.from(setup.energiesEv);
    for (let e = 0; e < this.energiesEv.length; e++) {
      if (!Number.isFinite(this.energiesEv[e]!)) throw new ScienceInputError(`Energy ${e} is not finite.`);
      if (e > 0 && !(this.energiesEv[e]! > this.energiesEv[e - 1]!)) {
        throw new ScienceInputError(
          `Energies must be strictly increasing (${this.energiesEv[e - 1]} eV is followed by ${this.energiesEv[e]} eV).`,
        );
      }
    }

    this.stateUsed = new Uint8Array(nStates);
    const seen = new Set<string>();
    let capacity = 1;
    this.symmetries = setup.symmetries.map((symmetry) => {
      const label = symmetryLabel(symmetry.irrep, symmetry.totalSpinMultiplicity);
      const key = `${symmetry.irrep}\u0000${symmetry.totalSpinMultiplicity}`;
      if (seen.has(key)) throw new ScienceInputError(`Symmetry ${label} is listed twice.`);
      seen.add(key);
      const channelState = new Int32Array(symmetry.channels.length);
      const weightByState = new Float64Array(nStates);
      symmetry.channels.forEach((channel, c) => {
        const index = stateIndex.get(channel.targetState);
        if (index === undefined) {
          throw new ScienceInputError(
            `${label}, channel ${c}: unknown target state "${channel.targetState}".`,
            { channel: c },
          );
        }
        const state = setup.targetStates[index]!;
        // Electron (spin ½) + target of multiplicity M_i couples to M_i ± 1 only.
        const total = symmetry.totalSpinMultiplicity;
        if (total !== state.spinMultiplicity + 1 && total !== state.spinMultiplicity - 1) {
          throw new ScienceInputError(
            `${label}, channel ${c}: target state "${state.id}" (2S+1 = ${state.spinMultiplicity}) plus an ` +
              `electron cannot give total 2S+1 = ${total}; allowed ${
                state.spinMultiplicity > 1 ? `${state.spinMultiplicity - 1} or ` : ""
              }${state.spinMultiplicity + 1}.`,
          );
        }
        channelState[c] = index;
        weightByState[index] = total / (2 * state.spinMultiplicity * state.degeneracy);
        this.stateUsed[index] = 1;
      });
      capacity = Math.max(capacity, symmetry.channels.length);
      return { label, channelState, weightByState };
    });

    const nEnergies = this.energiesEv.length;
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
        coefficient[n] =
          (4 * Math.PI * symmetry.weightByState[state]!) / ((2 * aboveThresholdEv) / HARTREE_EV);
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
   * @throws ScienceInputError naming the first missing point
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

const ENERGY_MATCH_TOLERANCE_EV = 1e-9;

/**
 * Cross sections and eigenphase sums from a complete K-matrix input document.
 *
 * Method: validate with `kMatrixInputSchema`; sort each symmetry's points by energy; require every
 * symmetry to use the same energy grid (within 1e-9 eV); feed each K-matrix to a
 * {@link KMatrixCrossSectionAccumulator}.
 *
 * @param input - the K-matrix input (unknown JSON is validated)
 * @param options.continuousEigenphaseSum - remove π jumps from the eigenphase sums along energy
 * @param options.symmetryTolerance - relative tolerance for K symmetry (default 1e-6)
 * @returns energies (eV), eigenphase sums per symmetry (rad), σ(i → j) per energy (Å²)
 * @throws ScienceInputError for any malformed or inconsistent input, with the symmetry and energy named
 */
export function computeKMatrixCrossSections(
  input: unknown,
  options: { continuousEigenphaseSum?: boolean; symmetryTolerance?: number } = {},
): KMatrixCrossSectionResult {
  const parsed: KMatrixInput = parseScienceInput(kMatrixInputSchema, input, "K-matrix input");
  const sortedPoints = parsed.symmetries.map((symmetry) =>
    [...symmetry.points].sort((p, q) => p.energyEv - q.energyEv),
  );
  const grid = sortedPoints[0]!.map((point) => point.energyEv);
  sortedPoints.forEach((points, s) => {
    const symmetry = parsed.symmetries[s]!;
    const label = symmetryLabel(symmetry.irrep, symmetry.totalSpinMultiplicity);
    if (points.length !== grid.length) {
      throw new ScienceInputError(
        `${label} has ${points.length} energies but ${symmetryLabel(parsed.symmetries[0]!.irrep, parsed.symmetries[0]!.totalSpinMultiplicity)} has ${grid.length}; all symmetries must share one energy grid.`,
      );
    }
    points.forEach((point, e) => {
      if (Math.abs(point.energyEv - grid[e]!) > ENERGY_MATCH_TOLERANCE_EV) {
        throw new ScienceInputError(
          `${label}: energy ${point.energyEv} eV does not match ${grid[e]} eV of the common grid; all symmetries must share one energy grid.`,
        );
      }
      if (e > 0 && point.energyEv === points[e - 1]!.energyEv) {
        throw new ScienceInputError(`${label}: energy ${point.energyEv} eV appears twice.`);
      }
    });
  });

  const accumulator = new KMatrixCrossSectionAccumulator(
    { targetStates: parsed.targetStates, symmetries: parsed.symmetries, energiesEv: grid },
    { symmetryTolerance: options.symmetryTolerance },
  );
  let buffer = new Float64Array(0);
  sortedPoints.forEach((points, s) => {
    points.forEach((point, e) => {
      const n = accumulator.openChannelCount(s, e);
      const rows = point.kMatrix;
      const badRow = rows.findIndex((row) => row.length !== rows.length);
      if (rows.length !== n || badRow >= 0) {
        const symmetry = parsed.symmetries[s]!;
        const shape =
          badRow >= 0 ? `row ${badRow} has ${rows[badRow]!.length} entries` : `${rows.length} rows`;
        throw new ScienceInputError(
          `${symmetryLabel(symmetry.irrep, symmetry.totalSpinMultiplicity)} at ${point.energyEv} eV: ${n} ` +
            `channel${n === 1 ? " is" : "s are"} open, so the K-matrix must be ${n}×${n}; it has ${shape}. ` +
            "Closed channels must be left out.",
          { openChannels: n },
        );
      }
      if (buffer.length < n * n) buffer = new Float64Array(n * n);
      for (let i = 0; i < n; i++) buffer.set(rows[i]!, i * n);
      accumulator.addPoint(s, e, n * n === buffer.length ? buffer : buffer.subarray(0, n * n));
    });
  });
  return accumulator.result({ continuousEigenphaseSum: options.continuousEigenphaseSum });
}

/**
 * Converts a result to plain arrays for JSON (see `kMatrixCrossSectionResultSchema`).
 *
 * @param result - output of {@link computeKMatrixCrossSections} or the accumulator
 */
export function kMatrixCrossSectionResultToJson(result: KMatrixCrossSectionResult) {
  return {
    energiesEv: Array.from(result.energiesEv),
    symmetries: result.symmetries.map((symmetry) => ({
      irrep: symmetry.irrep,
      totalSpinMultiplicity: symmetry.totalSpinMultiplicity,
      eigenphaseSumRad: Array.from(symmetry.eigenphaseSumRad),
    })),
    transitions: result.transitions.map((transition) => ({
      fromState: transition.fromState,
      toState: transition.toState,
      crossSectionA2: Array.from(transition.crossSectionA2),
    })),
  };
}
