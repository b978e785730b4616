/**
 * Boundary schemas for Maxwellian rate coefficients and modified-Arrhenius fits.
 */
import { z } from "zod";

/**
 * A cross section tabulated on increasing energies, linear between points. Below the first energy σ = 0
 * (so the first point acts as the threshold); above the last, see `tailExtrapolationSchema`.
 */
export const crossSectionTableSchema = z
  .object({
    energiesEv: z.array(z.number().nonnegative({ error: "Energies must be ≥ 0 eV." })).min(2),
    crossSectionsA2: z.array(z.number().nonnegative({ error: "Cross sections must be ≥ 0 Å²." })).min(2),
  })
  .superRefine((table, context) => {
    if (table.energiesEv.length !== table.crossSectionsA2.length) {
      context.addIssue({
        code: "custom",
        path: ["crossSectionsA2"],
        message: `The table has ${table.energiesEv.length} energies but ${table.crossSectionsA2.length} cross sections.`,
      });
    }
    for (let i = 1; i < table.energiesEv.length; i++) {
      if (!(table.energiesEv[i]! > table.energiesEv[i - 1]!)) {
        context.addIssue({
          code: "custom",
          path: ["energiesEv", i],
          message: `Energies must be strictly increasing (${table.energiesEv[i - 1]} eV then ${table.energiesEv[i]} eV).`,
        });
        break;
      }
    }
  });
export type CrossSectionTable = z.infer<typeof crossSectionTableSchema>;

/**
 * What σ is above the last tabulated energy E_N: `zero` (default), `constant` (σ = σ_N) or
 * `inverse-energy` (σ = σ_N·E_N/E).
 */
export const tailExtrapolationSchema = z.enum(["zero", "constant", "inverse-energy"]);
export type TailExtrapolation = z.infer<typeof tailExtrapolationSchema>;

export const temperaturesKSchema = z
  .array(z.number().positive({ error: "Temperatures must be > 0 K." }))
  .min(1)
  .max(1_000_000);

export const maxwellianRateRequestSchema = z.object({
  table: crossSectionTableSchema,
  temperaturesK: temperaturesKSchema,
  tail: tailExtrapolationSchema.default("zero"),
});
export type MaxwellianRateRequest = z.input<typeof maxwellianRateRequestSchema>;

/** k(T) = α (T/300 K)^β exp(−γ/T), α in cm³/s, γ in K. */
export const arrheniusParametersSchema = z.object({
  alpha: z.number(),
  beta: z.number(),
  gamma: z.number(),
});
export type ArrheniusParameters = z.infer<typeof arrheniusParametersSchema>;

export const maxwellianRateResultSchema = z.object({
  temperaturesK: z.array(z.number()),
  rateCm3PerS: z.array(z.number()),
  tail: tailExtrapolationSchema,
  /** Fraction of the Maxwellian population above the last tabulated energy, per temperature. */
  maxwellianFractionBeyondTable: z.array(z.number()),
  arrhenius: arrheniusParametersSchema
    .extend({ rmsRelativeResidual: z.number(), refined: z.boolean() })
    .optional(),
});
export type MaxwellianRateResultJson = z.infer<typeof maxwellianRateResultSchema>;
