/**
 * Boundary schemas for electron-impact ionization in the Binary-Encounter-Bethe (BEB) model.
 */
import { z } from "zod";

/** One occupied orbital: binding energy B, orbital kinetic energy U (both eV) and occupation N. */
export const bebOrbitalSchema = z.object({
  label: z.string().max(64).optional(),
  bindingEv: z.number().positive({ error: "bindingEv must be > 0 eV." }),
  kineticEv: z.number().nonnegative({ error: "kineticEv must be ≥ 0 eV." }),
  occupation: z.number().positive({ error: "occupation must be > 0." }).max(100),
});
export type BebOrbital = z.infer<typeof bebOrbitalSchema>;

/**
 * `neutral`: the original BEB formula. `singly-charged-ion`: the modified denominator for singly charged
 * molecular ions (see shared/science/ionization/beb.ts for the formula and its reference).
 */
export const bebVariantSchema = z.enum(["neutral", "singly-charged-ion"]);
export type BebVariant = z.infer<typeof bebVariantSchema>;

export const bebRequestSchema = z.object({
  orbitals: z.array(bebOrbitalSchema).min(1).max(500),
  energiesEv: z.array(z.number().nonnegative()).min(1).max(10_000_000),
  variant: bebVariantSchema.default("neutral"),
});
export type BebRequest = z.input<typeof bebRequestSchema>;

/** JSON result: total and per-orbital cross sections in Å² at each energy. */
export const bebResultSchema = z.object({
  energiesEv: z.array(z.number()),
  variant: bebVariantSchema,
  crossSectionA2: z.array(z.number()),
  orbitals: z.array(bebOrbitalSchema.extend({ crossSectionA2: z.array(z.number()) })),
});
export type BebResultJson = z.infer<typeof bebResultSchema>;
