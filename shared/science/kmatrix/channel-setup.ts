/**
 * Checks the channel setup of a K-matrix calculation (target states, channels per irreducible
 * representation and total spin, energy grid) and prepares what the cross-section accumulator needs per
 * symmetry: the target state of each channel and the spin-statistical weight of each state.
 *
 * Weight: for electron (spin ½) + target state i of multiplicity M_i = 2S_i + 1 and spatial degeneracy g_i,
 * total spin multiplicity M = 2S + 1 occurs with weight M / (2 M_i) among the 2(2S_i + 1) spin states of
 * the pair; dividing by g_i averages over the degenerate initial components.
 * Reference: e.g. P. G. Burke, R-Matrix Theory of Atomic Collisions (Springer, 2011) (spin averaging).
 */
import type { ScatteringChannel, TargetState } from "../../schemas/science-scattering";
import { ScienceInputError } from "../errors";

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

/** One symmetry, ready for the energy loop. */
export interface PreparedSymmetry {
  /** "A1 (2S+1 = 2)", for messages. */
  label: string;
  /** Index of the target state of each channel. */
  channelState: Int32Array;
  /** M / (2 M_i g_i) per target state index (0 where the state has no channel here). */
  weightByState: Float64Array;
}

/** The checked setup. */
export interface PreparedChannelSetup {
  /** Threshold (state energy) of each target state in eV. */
  thresholdsEv: Float64Array;
  /** The energy grid in eV. */
  energiesEv: Float64Array;
  symmetries: PreparedSymmetry[];
  /** 1 for target states that appear in some channel. */
  stateUsed: Uint8Array;
  /** Largest channel count of any symmetry (at least 1): the size of the accumulator's buffers. */
  maxChannelCount: number;
}

/** Readable name of a symmetry for messages, e.g. "A1 (2S+1 = 2)". */
export function symmetryLabel(irrep: string, multiplicity: number): string {
  return `${irrep} (2S+1 = ${multiplicity})`;
}

/**
 * Checks a channel setup and computes channel states and spin weights.
 *
 * @param setup - target states, channel lists and the energy grid (eV)
 * @returns thresholds (eV), grid (eV), prepared symmetries and the states in use
 * @throws ScienceInputError for unknown or duplicate states, inconsistent spins, duplicate symmetries or a
 *   grid that is not finite and strictly increasing
 */
export function prepareChannelSetup(setup: KMatrixCrossSectionSetup): PreparedChannelSetup {
  const stateIndex = new Map<string, number>();
  setup.targetStates.forEach((state, index) => {
    if (stateIndex.has(state.id)) throw new ScienceInputError(`Target state id "${state.id}" is repeated.`);
    stateIndex.set(state.id, index);
  });
  const nStates = setup.targetStates.length;
  const thresholdsEv = Float64Array.from(setup.targetStates, (state) => state.energyEv);

  const energiesEv = Float64Array.from(setup.energiesEv);
  for (let e = 0; e < energiesEv.length; e++) {
    if (!Number.isFinite(energiesEv[e]!)) throw new ScienceInputError(`Energy ${e} is not finite.`);
    if (e > 0 && !(energiesEv[e]! > energiesEv[e - 1]!)) {
      throw new ScienceInputError(
        `Energies must be strictly increasing (${energiesEv[e - 1]} eV is followed by ${energiesEv[e]} eV).`,
      );
    }
  }

  const stateUsed = new Uint8Array(nStates);
  const seen = new Set<string>();
  let maxChannelCount = 1;
  const symmetries = setup.symmetries.map((symmetry) => {
    const label = symmetryLabel(symmetry.irrep, symmetry.totalSpinMultiplicity);
    const key = `${symmetry.irrep}\u0000${symmetry.totalSpinMultiplicity}`;
    if (seen.has(key)) throw new ScienceInputError(`Symmetry ${label} is listed twice.`);
    seen.add(key);
    const channelState = new Int32Array(symmetry.channels.length);
    const weightByState = new Float64Array(nStates);
    symmetry.channels.forEach((channel, c) => {
      const index = stateIndex.get(channel.targetState);
      if (index === undefined) {
        const message = `${label}, channel ${c}: unknown target state "${channel.targetState}".`;
        throw new ScienceInputError(message, { channel: c });
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
      stateUsed[index] = 1;
    });
    maxChannelCount = Math.max(maxChannelCount, symmetry.channels.length);
    return { label, channelState, weightByState };
  });
  return { thresholdsEv, energiesEv, symmetries, stateUsed, maxChannelCount };
}
