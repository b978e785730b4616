/**
 * Cross sections and eigenphase sums from a whole K-matrix input document (the JSON read by
 * `sigmaflow kmatrix cross-sections`, format in cli/docs/kmatrix.md), and the plain-array JSON form of the
 * result. The physics lives in ./cross-sections.ts.
 */
import { type KMatrixInput, kMatrixInputSchema, parseScienceInput } from "../../schemas/science-scattering";
import { ScienceInputError } from "../errors";
import { symmetryLabel } from "./channel-setup";
import { KMatrixCrossSectionAccumulator, type KMatrixCrossSectionResult } from "./cross-sections";

/** Largest difference, eV, between the energies of two symmetries that still count as one grid point. */
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
