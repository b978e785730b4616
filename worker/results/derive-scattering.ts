/**
 * Results from a K-matrix table: the elastic integral cross section per irrep and summed, eigenphase sums
 * per irrep and summed (unwrapped along energy), the momentum-transfer cross section where the K-matrices
 * allow it exactly, and Maxwellian rate coefficients with modified-Arrhenius fits.
 *
 * Momentum transfer needs the differential cross section, which K-matrices over real spherical harmonics
 * give only with the full angular algebra. One case is exact and simple: a spherical potential (as the
 * demo solver's), where K is diagonal and every channel of a given l has the same phase shift δ_l = arctan K;
 * then σ_MT = (4π/k²) Σ_l (l + 1) sin²(δ_{l+1} − δ_l) (shared/science/partial-waves). Otherwise σ_MT is
 * left out and the reason goes into the run's results message.
 */
import type { RunAnalysis } from "../../shared/schemas/results";
import {
  KMATRIX_SYMMETRY_TOLERANCE,
  KMatrixCrossSectionAccumulator,
  unwrapPhases,
} from "../../shared/science/kmatrix";
import { partialWaveCrossSectionsA2 } from "../../shared/science/partial-waves";
import {
  type Derivation,
  type DerivedResult,
  quote,
  rateCoefficientResult,
  resultRow,
} from "./derive-common";
import { GROUND_STATE_ID, type KMatrixIrrep, type KMatrixTable } from "./readers/kmatrix-table";

/** Phases closer than this (radians, after removing multiples of π) are the same phase shift. */
const PHASE_ABSOLUTE_TOLERANCE_RAD = 1e-9;

/** The results message's name for a total spin, used only when a table has more than one. */
const spinLabel = (multiplicity: number) => `2S+1 = ${multiplicity}`;

/**
 * The phase shifts δ_0 … δ_L at each energy when the table is that of a spherical potential: K diagonal,
 * every (l, m) with |m| ≤ l up to some L present exactly once per total spin, and one phase per l (mod π)
 * across all irreps and total spins.
 *
 * @param table - a K-matrix table
 * @returns `{ phaseShiftsRad }` (per energy, indexed by l) or `{ reason }` saying which condition fails
 */
export function sphericalPhaseShifts(
  table: KMatrixTable,
): { phaseShiftsRad: Float64Array[]; lMax: number } | { reason: string } {
  const symmetries = table.irreps.filter((irrep) => irrep.channels.length > 0);
  const spins = [...new Set(symmetries.map((s) => s.totalSpinMultiplicity))];
  let lMax = -1;
  for (const spin of spins) {
    const where = new Map<string, string>();
    for (const symmetry of symmetries.filter((s) => s.totalSpinMultiplicity === spin)) {
      for (const { l, m } of symmetry.channels) {
        const key = `${l},${m}`;
        const other = where.get(key);
        if (other) {
          return { reason: `channel (l = ${l}, m = ${m}) appears in irreps ${other} and ${symmetry.irrep}` };
        }
        where.set(key, symmetry.irrep);
      }
    }
    const ls = [...where.keys()].map((key) => Number(key.split(",")[0]));
    const top = Math.max(...ls);
    if (lMax >= 0 && top !== lMax) return { reason: "the total spins have channels up to different l" };
    lMax = top;
    for (let l = 0; l <= top; l++) {
      for (let m = -l; m <= l; m++) {
        if (!where.has(`${l},${m}`)) {
          return {
            reason: `the channels stop short of a full set of partial waves: (l = ${l}, m = ${m}) is missing`,
          };
        }
      }
    }
  }
  const phaseShiftsRad: Float64Array[] = [];
  for (let e = 0; e < table.energiesEv.length; e++) {
    const energyEv = table.energiesEv[e]!;
    const phases = new Float64Array(lMax + 1);
    const seenAt: (string | null)[] = new Array(lMax + 1).fill(null);
    for (const symmetry of symmetries) {
      const problem = diagonalPhases(symmetry, e, energyEv, phases, seenAt);
      if (problem) return { reason: problem };
    }
    phaseShiftsRad.push(phases);
  }
  return { phaseShiftsRad, lMax };
}

/** Checks one K-matrix for diagonality and its phases against those seen for each l; fills new ones in. */
function diagonalPhases(
  symmetry: KMatrixIrrep,
  energyIndex: number,
  energyEv: number,
  phases: Float64Array,
  seenAt: (string | null)[],
): string | null {
  const n = symmetry.channels.length;
  const k = symmetry.points[energyIndex]!.kMatrix;
  let largest = 0;
  for (let i = 0; i < n * n; i++) largest = Math.max(largest, Math.abs(k[i]!));
  const at = `irrep ${symmetry.irrep} at ${energyEv} eV`;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      if (Math.abs(k[i * n + j]!) > KMATRIX_SYMMETRY_TOLERANCE * largest) {
        const a = symmetry.channels[i]!;
        const b = symmetry.channels[j]!;
        return (
          `${at}: K couples channels (l = ${a.l}, m = ${a.m}) and (l = ${b.l}, m = ${b.m}), so the ` +
          "K-matrices are not those of a spherical potential"
        );
      }
    }
    const { l, m } = symmetry.channels[i]!;
    const delta = Math.atan(k[i * n + i]!);
    const seen = seenAt[l];
    if (seen === null || seen === undefined) {
      phases[l] = delta;
      seenAt[l] = `${symmetry.irrep} (m = ${m})`;
      continue;
    }
    let difference = delta - phases[l]!;
    difference -= Math.PI * Math.round(difference / Math.PI);
    const scale = Math.max(Math.abs(delta), Math.abs(phases[l]!));
    if (Math.abs(difference) > KMATRIX_SYMMETRY_TOLERANCE * scale + PHASE_ABSOLUTE_TOLERANCE_RAD) {
      return (
        `${at}: the l = ${l} phase shift is ${quote(delta, 7)} rad for m = ${m} but ${quote(phases[l]!, 7)} rad in ` +
        `${seen}, so the potential is not spherical`
      );
    }
  }
  return null;
}

function addInto(target: Float64Array, values: ArrayLike<number>): void {
  for (let i = 0; i < target.length; i++) target[i]! += values[i]!;
}

/**
 * Results from a K-matrix table.
 *
 * @param table - from `readKMatrixTable`
 * @param analysis - the run's postprocess options (temperatures of the rates)
 * @param context.source - where the table came from, e.g. "kmatrices.txt of stage scatter"
 * @returns result rows and notes (momentum transfer skipped, fits not possible)
 * @throws ScienceInputError from the science core (a K-matrix it cannot use)
 */
export function deriveScatteringResults(
  table: KMatrixTable,
  analysis: RunAnalysis,
  context: { source: string },
): Derivation {
  const symmetries = table.irreps.filter((irrep) => irrep.channels.length > 0);
  const energiesEv = Float64Array.from(table.energiesEv);
  const spins = [...new Set(symmetries.map((s) => s.totalSpinMultiplicity))].sort((a, b) => a - b);
  const severalSpins = spins.length > 1;
  const irrepNames = [...new Set(symmetries.map((s) => s.irrep))];
  const lMax = Math.max(...symmetries.flatMap((s) => s.channels.map((c) => c.l)));
  const teaching = /teaching-grade/i.test(table.model) ? "teaching-grade model; " : "";
  const origin = `${teaching}K-matrices of ${context.source} (model: ${table.model})`;
  const lNote = `channels up to l = ${lMax} only, so higher partial waves are missing`;

  const elasticByIrrep: { irrep: string; sigmaA2: Float64Array }[] = [];
  const phaseBySymmetry: { irrep: string; spin: number; phaseRad: Float64Array }[] = [];
  for (const irrep of irrepNames) {
    const group = symmetries.filter((s) => s.irrep === irrep);
    const accumulator = new KMatrixCrossSectionAccumulator({
      targetStates: [
        { id: GROUND_STATE_ID, spinMultiplicity: table.targetSpinMultiplicity, energyEv: 0, degeneracy: 1 },
      ],
      symmetries: group.map((s) => ({
        irrep: s.irrep,
        totalSpinMultiplicity: s.totalSpinMultiplicity,
        channels: s.channels.map((c) => ({ targetState: GROUND_STATE_ID, l: c.l, m: c.m })),
      })),
      energiesEv,
    });
    group.forEach((symmetry, s) => {
      symmetry.points.forEach((point, e) => {
        accumulator.addPoint(s, e, point.kMatrix);
      });
    });
    const result = accumulator.result({ continuousEigenphaseSum: true });
    elasticByIrrep.push({ irrep, sigmaA2: result.transitions[0]!.crossSectionA2 });
    for (const s of result.symmetries) {
      phaseBySymmetry.push({ irrep, spin: s.totalSpinMultiplicity, phaseRad: s.eigenphaseSumRad });
    }
  }

  const elasticA2 = new Float64Array(energiesEv.length);
  for (const { sigmaA2 } of elasticByIrrep) addInto(elasticA2, sigmaA2);
  const elasticMethod =
    `Elastic integral cross section from the ${origin}: S = (1 + iK)(1 − iK)⁻¹, T = S − 1, ` +
    "σ = (π/k²) Σ over total spins of (2S+1)/(2(2S_t+1)) Σ_ab |T_ab|² (Sigmaflow science core, " +
    `shared/science/kmatrix); ${lNote}`;
  const results: DerivedResult[] = [
    resultRow(
      {
        kind: "cross-section",
        process: "elastic",
        irrep: null,
        label: "",
        method: `${elasticMethod}; summed over ${irrepNames.length} irreps.`,
      },
      [
        ["energy_eV", energiesEv],
        ["cross_section_A2", elasticA2],
      ],
    ),
    ...elasticByIrrep.map(({ irrep, sigmaA2 }) =>
      resultRow(
        {
          kind: "cross-section",
          process: "elastic",
          irrep,
          label: "",
          method: `${elasticMethod}; the contribution of irrep ${irrep}.`,
        },
        [
          ["energy_eV", energiesEv],
          ["cross_section_A2", sigmaA2],
        ],
      ),
    ),
  ];

  const notes: string[] = [];
  const spherical = sphericalPhaseShifts(table);
  let momentumTransferA2: Float64Array | null = null;
  if ("phaseShiftsRad" in spherical) {
    const sigma = energiesEv.map(
      (energyEv, e) => partialWaveCrossSectionsA2(energyEv, spherical.phaseShiftsRad[e]!).momentumTransferA2,
    );
    momentumTransferA2 = sigma;
    results.push(
      resultRow(
        {
          kind: "cross-section",
          process: "momentum-transfer",
          irrep: null,
          label: "",
          method:
            `Momentum-transfer cross section from the ${origin}: K is diagonal with one phase shift per l ` +
            `(a spherical potential), δ_l = arctan K, σ_MT = (4π/k²) Σ_l (l + 1) sin²(δ_(l+1) − δ_l) ` +
            `(shared/science/partial-waves); ${lNote} (δ_l = 0 beyond l = ${spherical.lMax}).`,
        },
        [
          ["energy_eV", energiesEv],
          ["cross_section_A2", sigma],
        ],
      ),
    );
  } else {
    notes.push(
      `No momentum-transfer cross section from ${context.source}: ${spherical.reason}; it is derived only from ` +
        "K-matrices of a spherical potential (diagonal, one phase shift per l).",
    );
  }

  const phaseMethod = (what: string) =>
    `Eigenphase sum Σ arctan λ (λ the eigenvalues of K) from the ${origin}, ${what}; made continuous along ` +
    "energy by removing jumps of π (shared/science/kmatrix unwrapPhases; an unresolved narrow resonance would " +
    "look like such a jump).";
  for (const spin of spins) {
    const sum = new Float64Array(energiesEv.length);
    for (const p of phaseBySymmetry.filter((p) => p.spin === spin)) addInto(sum, p.phaseRad);
    const label = severalSpins ? spinLabel(spin) : "";
    results.push(
      resultRow(
        {
          kind: "eigenphase-sum",
          process: "elastic",
          irrep: null,
          label,
          method: phaseMethod(`summed over irreps${severalSpins ? ` of total spin ${label}` : ""}`),
        },
        [
          ["energy_eV", energiesEv],
          ["eigenphase_sum_rad", unwrapPhases(sum)],
        ],
      ),
    );
  }
  for (const p of phaseBySymmetry) {
    results.push(
      resultRow(
        {
          kind: "eigenphase-sum",
          process: "elastic",
          irrep: p.irrep,
          label: severalSpins ? spinLabel(p.spin) : "",
          method: phaseMethod(`irrep ${p.irrep}${severalSpins ? `, total spin ${spinLabel(p.spin)}` : ""}`),
        },
        [
          ["energy_eV", energiesEv],
          ["eigenphase_sum_rad", p.phaseRad],
        ],
      ),
    );
  }

  const rates: Derivation[] = [
    rateCoefficientResult(
      { process: "elastic", irrep: null, label: "", source: "the elastic total above" },
      { energiesEv, crossSectionsA2: elasticA2 },
      analysis,
      false,
    ),
  ];
  if (momentumTransferA2) {
    rates.push(
      rateCoefficientResult(
        {
          process: "momentum-transfer",
          irrep: null,
          label: "",
          source: "the momentum-transfer cross section above",
        },
        { energiesEv, crossSectionsA2: momentumTransferA2 },
        analysis,
        false,
      ),
    );
  }
  return {
    results: [...results, ...rates.flatMap((r) => r.results)],
    notes: [...notes, ...rates.flatMap((r) => r.notes)],
  };
}
