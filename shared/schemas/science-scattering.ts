/**
 * Boundary schemas for scattering results computed from K-matrices: target states, channels per
 * irreducible representation and total spin, K-matrices at each energy, and the cross-section result.
 * Also holds `parseScienceInput`, the one way the scattering science modules turn unknown input into typed
 * data (zod issues become a `ScienceInputError` with a readable message).
 */
import { z } from "zod";
import { ScienceInputError } from "../science/errors";

/**
 * Validates `input` against `schema`.
 *
 * @param schema - zod schema of the expected input
 * @param input - untrusted value (parsed JSON, CLI options...)
 * @param what - name of the input used in the error message, e.g. "K-matrix input"
 * @returns the parsed value
 * @throws ScienceInputError listing every issue with its path
 */
export function parseScienceInput<T extends z.ZodType>(schema: T, input: unknown, what: string): z.output<T> {
  const result = schema.safeParse(input);
  if (!result.success) {
    throw new ScienceInputError(`Invalid ${what}:\n${z.prettifyError(result.error)}`, result.error.issues);
  }
  return result.data;
}

/** An electronic state of the target; `energyEv` is on the same scale as the scattering energies. */
export const targetStateSchema = z.object({
  id: z.string().min(1).max(64),
  label: z.string().max(200).optional(),
  /** 2S + 1 of the target state. */
  spinMultiplicity: z.int().min(1).max(99),
  /** Energy of the state (threshold of its channels) in eV, usually 0 for the ground state. */
  energyEv: z.number(),
  /**
   * Number of degenerate spatial components gathered under this id (default 1). The initial-state average
   * divides by it; list components separately (degeneracy 1 each) when the point group splits them.
   */
  degeneracy: z.int().min(1).max(99).default(1),
});
export type TargetState = z.infer<typeof targetStateSchema>;

/** A scattering channel: a target state plus the partial wave (l, m) of the scattered electron. */
export const scatteringChannelSchema = z
  .object({
    targetState: z.string().min(1).max(64),
    l: z.int().min(0).max(500),
    m: z.int().optional(),
  })
  .refine((channel) => channel.m === undefined || Math.abs(channel.m) <= channel.l, {
    error: "Channel m must satisfy |m| ≤ l.",
  });
export type ScatteringChannel = z.infer<typeof scatteringChannelSchema>;

/** A K-matrix over the channels open at `energyEv` (closed channels are left out, list order kept). */
export const kMatrixPointSchema = z.object({
  /** Total energy in eV on the scale of the target-state energies (electron energy above the ground state). */
  energyEv: z.number(),
  kMatrix: z.array(z.array(z.number())),
});
export type KMatrixPoint = z.infer<typeof kMatrixPointSchema>;

/** Channels and K-matrices of one irreducible representation and total spin multiplicity. */
export const scatteringSymmetrySchema = z.object({
  irrep: z.string().min(1).max(32),
  /** 2S + 1 of electron + target. */
  totalSpinMultiplicity: z.int().min(1).max(100),
  channels: z.array(scatteringChannelSchema).min(1).max(2000),
  points: z.array(kMatrixPointSchema).min(1),
});
export type ScatteringSymmetry = z.infer<typeof scatteringSymmetrySchema>;

/** The K-matrix input document read by `sigmaflow kmatrix cross-sections` and the science core. */
export const kMatrixInputSchema = z.object({
  targetStates: z.array(targetStateSchema).min(1).max(500),
  symmetries: z.array(scatteringSymmetrySchema).min(1).max(500),
});
export type KMatrixInput = z.infer<typeof kMatrixInputSchema>;
export type KMatrixInputDocument = z.input<typeof kMatrixInputSchema>;

/** Eigenphase sums of one symmetry at each energy. */
export const eigenphaseSeriesSchema = z.object({
  irrep: z.string(),
  totalSpinMultiplicity: z.int(),
  eigenphaseSumRad: z.array(z.number()),
});

/** σ(from → to) at each energy in Å², summed over symmetries and total spins. */
export const transitionCrossSectionSchema = z.object({
  fromState: z.string(),
  toState: z.string(),
  crossSectionA2: z.array(z.number()),
});

/** Result of the K-matrix cross-section computation (JSON form). */
export const kMatrixCrossSectionResultSchema = z.object({
  energiesEv: z.array(z.number()),
  symmetries: z.array(eigenphaseSeriesSchema),
  transitions: z.array(transitionCrossSectionSchema),
});
export type KMatrixCrossSectionResultJson = z.infer<typeof kMatrixCrossSectionResultSchema>;
