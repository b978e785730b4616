/**
 * Boundary schemas for rotational excitation of polar molecules in the dipole Born approximation.
 */
import { z } from "zod";

export const dipoleBornRequestSchema = z
  .object({
    /** Permanent dipole moment μ in debye. */
    dipoleDebye: z.number().positive({ error: "dipoleDebye must be > 0 D." }).max(100),
    /** Rotational constant B in cm⁻¹ (level energies B·J(J+1)). */
    rotationalConstantCm1: z.number().positive({ error: "rotationalConstantCm1 must be > 0 cm⁻¹." }),
    /** Initial rotational quantum number J. */
    j: z.int().min(0).max(500),
    /** Final J (J ± 1); default J + 1. */
    jFinal: z.int().min(0).max(501).optional(),
    /** Projection K on the symmetry axis of a symmetric top (0 for linear molecules); conserved. */
    kProjection: z.int().default(0),
    /** Incident electron energies in eV (> 0). */
    energiesEv: z
      .array(z.number().positive({ error: "Energies must be > 0 eV." }))
      .min(1)
      .max(10_000_000),
  })
  .superRefine((request, context) => {
    const jFinal = request.jFinal ?? request.j + 1;
    if (Math.abs(jFinal - request.j) !== 1) {
      context.addIssue({
        code: "custom",
        path: ["jFinal"],
        message: "The dipole Born approximation couples J to J ± 1 only.",
      });
    }
    if (Math.abs(request.kProjection) > Math.min(request.j, jFinal)) {
      context.addIssue({
        code: "custom",
        path: ["kProjection"],
        message: "|K| must not exceed the initial or final J.",
      });
    }
  });
export type DipoleBornRequest = z.input<typeof dipoleBornRequestSchema>;

export const dipoleBornResultSchema = z.object({
  j: z.int(),
  jFinal: z.int(),
  kProjection: z.int(),
  thresholdEv: z.number(),
  energiesEv: z.array(z.number()),
  crossSectionA2: z.array(z.number()),
});
export type DipoleBornResultJson = z.infer<typeof dipoleBornResultSchema>;
