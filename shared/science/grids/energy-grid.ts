/**
 * Collision-energy grids in eV: linear, logarithmic and piecewise grids, refined around channel thresholds.
 * Every grid is returned sorted ascending without duplicates; all energies are positive.
 */
import {
  type BaseGridSpec,
  baseGridSchema,
  type EnergyGridRequest,
  energyGridRequestSchema,
  parseTargetInput,
  type ThresholdRefinement,
  thresholdRefinementSchema,
} from "../../schemas/science-target";

/** Points closer than this relative distance are one point (absorbs round-off between segments). */
const RELATIVE_MERGE_TOLERANCE = 1e-10;

/**
 * Sorts energies ascending and drops near-duplicates (relative difference ≤ 1e-10).
 *
 * @param energiesEv - energies in eV
 * @returns a new sorted array without duplicates
 */
export function sortUniqueEnergies(energiesEv: readonly number[]): number[] {
  const sorted = [...energiesEv].sort((a, b) => a - b);
  const out: number[] = [];
  for (const e of sorted) {
    const last = out[out.length - 1];
    if (last === undefined || e - last > RELATIVE_MERGE_TOLERANCE * Math.max(Math.abs(e), Math.abs(last)))
      out.push(e);
  }
  return out;
}

/**
 * Evenly spaced energies E_k = E₀ + k·ΔE from `startEv` to `stopEv` inclusive.
 *
 * @param startEv - first energy (> 0), eV
 * @param stopEv - last energy (> startEv), eV
 * @param spacing - `{ count }` points, or `{ stepEv }`: the last point is stopEv even when the step does
 *   not divide the interval (the last interval is then shorter)
 */
export function linearGrid(
  startEv: number,
  stopEv: number,
  spacing: { count: number } | { stepEv: number },
): number[] {
  const spec = parseTargetInput(
    baseGridSchema,
    { kind: "linear", startEv, stopEv, ...spacing },
    "linear grid",
  );
  return buildBase(spec);
}

/**
 * Geometrically spaced energies E_k = E₀ (E₁/E₀)^{k/(n−1)}: constant ratio, dense at low energy.
 *
 * @param startEv - first energy (> 0), eV
 * @param stopEv - last energy (> startEv), eV
 * @param count - number of points (≥ 2)
 */
export function logGrid(startEv: number, stopEv: number, count: number): number[] {
  return buildBase(parseTargetInput(baseGridSchema, { kind: "log", startEv, stopEv, count }, "log grid"));
}

function buildBase(spec: ReturnType<typeof baseGridSchema.parse>): number[] {
  if (spec.kind === "piecewise")
    return sortUniqueEnergies(spec.segments.flatMap((segment) => buildBase(segment)));
  const { startEv, stopEv } = spec;
  const points: number[] = [];
  if (spec.kind === "log") {
    const ratio = stopEv / startEv;
    for (let k = 0; k < spec.count; k++) points.push(startEv * ratio ** (k / (spec.count - 1)));
  } else if (spec.count !== undefined) {
    for (let k = 0; k < spec.count; k++) points.push(startEv + ((stopEv - startEv) * k) / (spec.count - 1));
  } else {
    const step = spec.stepEv!;
    // Multiplying k·step (rather than accumulating) keeps round-off from drifting along the grid.
    for (let k = 0; startEv + k * step < stopEv * (1 - RELATIVE_MERGE_TOLERANCE); k++)
      points.push(startEv + k * step);
    points.push(stopEv);
  }
  points[points.length - 1] = stopEv;
  return sortUniqueEnergies(points);
}

/**
 * Builds a base grid (linear, log or piecewise) from its specification.
 *
 * @param spec - see `baseGridSchema` in shared/schemas/science-target.ts
 * @returns sorted unique energies in eV
 * @throws ScienceInputError for invalid specifications
 */
export function buildBaseGrid(spec: BaseGridSpec): number[] {
  return buildBase(parseTargetInput(baseGridSchema, spec, "energy grid"));
}

/**
 * Offsets from a threshold used for refinement: δ_k = w (k/n)², k = 1..n.
 *
 * Why quadratic: just above a threshold E_t the new channel's momentum is k ∝ √(E − E_t) and cross
 * sections vary smoothly in k (Wigner threshold law σ ∝ k^{2l+1} for excitation); points uniform in k are
 * quadratic in energy, densest at the threshold. The same offsets below E_t resolve the cusp seen in the
 * open channels (Wigner cusp).
 * Reference: E. P. Wigner, Phys. Rev. 73, 1002 (1948).
 *
 * @param halfWidthEv - w, eV
 * @param pointsPerSide - n
 */
export function thresholdOffsetsEv(halfWidthEv: number, pointsPerSide: number): number[] {
  return Array.from({ length: pointsPerSide }, (_, i) => halfWidthEv * ((i + 1) / pointsPerSide) ** 2);
}

/**
 * Adds dense points around threshold energies to an existing grid.
 *
 * @param gridEv - base grid in eV (any order)
 * @param thresholds - threshold energies (eV) with half-width (eV, default 0.1), points per side (default 10)
 *   and whether to include the threshold itself (default false)
 * @returns sorted unique energies; refinement points outside the base grid's span [min, max] are dropped,
 *   so refinement never extends the requested energy range
 * @throws ScienceInputError for invalid refinements
 */
export function refineAroundThresholds(
  gridEv: readonly number[],
  thresholds: readonly ThresholdRefinement[],
): number[] {
  const base = sortUniqueEnergies(gridEv);
  if (base.length === 0) return [];
  const low = base[0]!;
  const high = base[base.length - 1]!;
  const extra: number[] = [];
  for (const raw of thresholds) {
    const t = parseTargetInput(thresholdRefinementSchema, raw, "threshold refinement");
    if (t.includeThreshold) extra.push(t.energyEv);
    for (const delta of thresholdOffsetsEv(t.halfWidthEv, t.pointsPerSide))
      extra.push(t.energyEv - delta, t.energyEv + delta);
  }
  return sortUniqueEnergies([...base, ...extra.filter((e) => e >= low && e <= high)]);
}

/**
 * Base grid plus threshold refinement in one call.
 *
 * @param request - `{ base, thresholds }` (see `energyGridRequestSchema`)
 * @returns sorted unique energies in eV
 */
export function buildEnergyGrid(request: EnergyGridRequest): number[] {
  const parsed = parseTargetInput(energyGridRequestSchema, request, "energy grid");
  return refineAroundThresholds(buildBase(parsed.base), parsed.thresholds);
}
