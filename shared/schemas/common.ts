import { z } from "zod";

/** The one error shape every API failure uses: `{ error: { code, message, details? } }`. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

export const uuidSchema = z.uuid();
export const isoDateTimeSchema = z.iso.datetime({ offset: true });

export const emailSchema = z
  .email({ error: "Enter a valid e-mail address." })
  .max(254)
  .transform((value) => value.toLowerCase());
