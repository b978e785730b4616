import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";

export const apiTokenSchema = z.object({
  id: uuidSchema,
  name: z.string(),
  /** First characters of the secret, enough to recognise it; the secret itself is shown once. */
  prefix: z.string(),
  createdAt: isoDateTimeSchema,
  lastUsedAt: isoDateTimeSchema.nullable(),
  expiresAt: isoDateTimeSchema.nullable(),
});
export type ApiToken = z.infer<typeof apiTokenSchema>;

export const apiTokenListSchema = z.object({ tokens: z.array(apiTokenSchema) });
export type ApiTokenList = z.infer<typeof apiTokenListSchema>;

export const createApiTokenRequestSchema = z.strictObject({
  name: z.string().trim().min(1, { error: "Name the token after the script that will use it." }).max(80),
  expiresInDays: z.number().int().min(1).max(365).nullable().default(90),
});
export type CreateApiTokenRequest = z.input<typeof createApiTokenRequestSchema>;

export const createdApiTokenSchema = z.object({
  token: apiTokenSchema,
  /** The full secret, returned only in this response. */
  secret: z.string(),
});
export type CreatedApiToken = z.infer<typeof createdApiTokenSchema>;
